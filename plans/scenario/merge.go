package scenario

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"sort"
)

// headerLine wraps the Header on the first line of a shard's JSON lines.
type headerLine struct {
	Sweep *Header `json:"sweep"`
}

// WriteLines writes out as JSON lines: the header, then one record a line in
// index order.
func WriteLines(w io.Writer, out *Output) error {
	bw := bufio.NewWriter(w)
	enc := json.NewEncoder(bw)
	if err := enc.Encode(headerLine{Sweep: &out.Header}); err != nil {
		return fmt.Errorf("scenario: writing shard header: %w", err)
	}
	for i := range out.Records {
		if err := enc.Encode(&out.Records[i]); err != nil {
			return fmt.Errorf("scenario: writing scenario %d: %w", out.Records[i].Index, err)
		}
	}
	return bw.Flush()
}

// ReadLines reads one shard written by WriteLines; name is used in errors.
func ReadLines(r io.Reader, name string) (*Output, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), 64*1024*1024)
	out := &Output{}
	line := 0
	for sc.Scan() {
		line++
		text := bytes.TrimSpace(sc.Bytes())
		if len(text) == 0 {
			continue
		}
		if out.Header.Shards == 0 {
			var h headerLine
			if err := strictUnmarshal(text, &h); err != nil || h.Sweep == nil {
				return nil, fmt.Errorf("scenario: %s:%d: want the sweep header line first (written by sweep --shard)", name, line)
			}
			if h.Sweep.Shards < 1 {
				return nil, fmt.Errorf("scenario: %s:%d: header has no shard count", name, line)
			}
			out.Header = *h.Sweep
			continue
		}
		var rec Record
		if err := strictUnmarshal(text, &rec); err != nil {
			return nil, fmt.Errorf("scenario: %s:%d: %w", name, line, err)
		}
		out.Records = append(out.Records, rec)
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("scenario: reading %s: %w", name, err)
	}
	if out.Header.Shards == 0 {
		return nil, fmt.Errorf("scenario: %s: empty (no sweep header)", name)
	}
	return out, nil
}

func strictUnmarshal(data []byte, v any) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	return dec.Decode(v)
}

// Merge combines the shards of one sweep. It checks that they come from the
// same sweep (case, factors, base, settings, shard count), that each shard
// appears once, and that every scenario is present exactly once in the
// shard it belongs to.
func Merge(shards []*Output) (*Output, error) {
	if len(shards) == 0 {
		return nil, fmt.Errorf("scenario: merge: no shards")
	}
	first := shards[0].Header
	key, err := json.Marshal(sweepIdentity(first))
	if err != nil {
		return nil, err
	}
	seen := map[int]bool{}
	total := first.GridSize + first.References
	byIndex := make([]*Record, total)
	for _, s := range shards {
		k, err := json.Marshal(sweepIdentity(s.Header))
		if err != nil {
			return nil, err
		}
		if !bytes.Equal(k, key) {
			return nil, fmt.Errorf("scenario: merge: shard %d/%d is from another sweep (case, factors, shard count or settings differ)", s.Header.Shard, s.Header.Shards)
		}
		if seen[s.Header.Shard] {
			return nil, fmt.Errorf("scenario: merge: shard %d/%d given twice", s.Header.Shard, s.Header.Shards)
		}
		seen[s.Header.Shard] = true
		sh := Shard{Index: s.Header.Shard, Of: s.Header.Shards}
		for i := range s.Records {
			r := &s.Records[i]
			if r.Index < 0 || r.Index >= total {
				return nil, fmt.Errorf("scenario: merge: shard %s: scenario index %d out of range [0, %d)", sh, r.Index, total)
			}
			if !sh.Owns(r.Index) {
				return nil, fmt.Errorf("scenario: merge: shard %s holds scenario %d, which belongs to shard %d", sh, r.Index, r.Index%sh.Of)
			}
			if byIndex[r.Index] != nil {
				return nil, fmt.Errorf("scenario: merge: scenario %d appears twice", r.Index)
			}
			byIndex[r.Index] = r
		}
	}
	var missingShards []int
	for i := 0; i < first.Shards; i++ {
		if !seen[i] {
			missingShards = append(missingShards, i)
		}
	}
	if len(missingShards) > 0 {
		return nil, fmt.Errorf("scenario: merge: missing shards %v of %d", missingShards, first.Shards)
	}
	out := &Output{Header: first}
	out.Header.Shard, out.Header.Shards = 0, 1
	for j, r := range byIndex {
		if r == nil {
			return nil, fmt.Errorf("scenario: merge: scenario %d is missing (shard %d/%d incomplete)", j, j%first.Shards, first.Shards)
		}
		out.Records = append(out.Records, *r)
	}
	sort.SliceStable(out.Records, func(a, b int) bool { return out.Records[a].Index < out.Records[b].Index })
	return out, nil
}

// sweepIdentity is what shards of one sweep share.
func sweepIdentity(h Header) Header {
	h.Shard = 0
	return h
}
