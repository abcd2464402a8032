package mip

import "container/heap"

// boundChange sets column col to [lo, up].
type boundChange struct {
	col    int
	lo, up float64
}

// node is an open subproblem: the global domain with the bound changes of
// the node and all its ancestors applied (changes are intersections, so
// their order does not matter). Each node stores only what its parent's
// processing changed, plus the branching bound, so memory grows with the
// tree, not with tree × columns.
type node struct {
	id       int // creation order; breaks ties so the search is deterministic
	depth    int
	parent   *node
	delta    []boundChange
	basis    *packedBasis // warm start (the parent's final basis)
	bound    float64      // lower bound on the subproblem's optimum
	estimate float64      // estimated optimum of the best solution below
	// branching that created the node, for pseudocost updates
	branchVar  int // −1 for the root
	branchUp   bool
	branchDist float64 // distance the branched variable must move (> 0)
	parentObj  float64

	solved  bool // the node's LP was solved and counted already (the root)
	removed bool // taken out of the queue
	pos     [2]int
}

// nodeHeap is a binary heap of nodes ordered by key k (0 bound, 1 estimate).
type nodeHeap struct {
	k     int
	nodes []*node
}

func (h *nodeHeap) key(n *node) float64 {
	if h.k == 0 {
		return n.bound
	}
	return n.estimate
}
func (h *nodeHeap) Len() int { return len(h.nodes) }
func (h *nodeHeap) Less(a, b int) bool {
	na, nb := h.nodes[a], h.nodes[b]
	ka, kb := h.key(na), h.key(nb)
	if ka != kb {
		return ka < kb
	}
	return na.id > nb.id // deeper-created (newer) nodes first on ties
}
func (h *nodeHeap) Swap(a, b int) {
	h.nodes[a], h.nodes[b] = h.nodes[b], h.nodes[a]
	h.nodes[a].pos[h.k] = a
	h.nodes[b].pos[h.k] = b
}
func (h *nodeHeap) Push(x any) {
	n := x.(*node)
	n.pos[h.k] = len(h.nodes)
	h.nodes = append(h.nodes, n)
}
func (h *nodeHeap) Pop() any {
	n := h.nodes[len(h.nodes)-1]
	h.nodes[len(h.nodes)-1] = nil
	h.nodes = h.nodes[:len(h.nodes)-1]
	n.pos[h.k] = -1
	return n
}

// nodeQueue holds the open nodes in two heaps: by bound and by estimate.
// Push, Pop and Remove cost O(log n).
type nodeQueue struct {
	byBound    nodeHeap
	byEstimate nodeHeap
}

func newNodeQueue() *nodeQueue {
	return &nodeQueue{byBound: nodeHeap{k: 0}, byEstimate: nodeHeap{k: 1}}
}

func (q *nodeQueue) Len() int { return q.byBound.Len() }

func (q *nodeQueue) push(n *node) {
	heap.Push(&q.byBound, n)
	heap.Push(&q.byEstimate, n)
}

func (q *nodeQueue) remove(n *node) {
	heap.Remove(&q.byBound, n.pos[0])
	heap.Remove(&q.byEstimate, n.pos[1])
	n.removed = true
}

// popBest removes and returns the node with the smallest bound.
func (q *nodeQueue) popBest() *node {
	if q.Len() == 0 {
		return nil
	}
	n := q.byBound.nodes[0]
	q.remove(n)
	return n
}

// popEstimate removes and returns the node with the smallest estimate.
func (q *nodeQueue) popEstimate() *node {
	if q.Len() == 0 {
		return nil
	}
	n := q.byEstimate.nodes[0]
	q.remove(n)
	return n
}

// minBound returns the smallest bound in the queue (+Inf when empty).
func (q *nodeQueue) minBound() float64 {
	if q.Len() == 0 {
		return inf
	}
	return q.byBound.nodes[0].bound
}

// prune removes every node whose bound is at least limit and returns the
// smallest bound among them (+Inf when none). Cost O(n log n).
func (q *nodeQueue) prune(limit float64) float64 {
	least := inf
	var drop []*node
	for _, n := range q.byBound.nodes {
		if n.bound >= limit {
			drop = append(drop, n)
		}
	}
	for _, n := range drop {
		if n.bound < least {
			least = n.bound
		}
		q.remove(n)
	}
	return least
}
