package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/spf13/cobra"
)

// newMergeCmd builds `ohmfit merge`.
func newMergeCmd(out, errOut io.Writer) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "merge SHARD.json...",
		Short: "Combine the JSON results of fit --shard runs into the result of one whole run",
		Long: `Combine the JSON results of "ohmfit fit FILE --shard K/N --format json", one per
shard, into the JSON result of one whole run: the same ranked list (ranked
again across the shards, Pareto marks taken again over the merged list),
"evaluated" and "solves" summed, "exhaustive" true only when every shard
was, and "bound" the smallest of the shards' bounds. Every shard 1..N of the
same search must be given, each once.`,
		Example: `  # four shards, e.g. as the tasks of a job array, then one result
  for k in 1 2 3 4; do ohmfit fit example:gain-stage --shard $k/4 --format json -o part-$k.json; done
  ohmfit merge part-*.json`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) == 0 {
				return usagef(cmd.CommandPath(), "merge takes the shards' JSON files, got none")
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			doc, err := mergeShardFiles(args)
			if err != nil {
				return err
			}
			return writeJSON(out, doc)
		},
	}
	return cmd
}

// shardDoc is what merge reads of one shard's result.
type shardDoc struct {
	file      string
	Name      string            `json:"name"`
	Status    string            `json:"status"`
	Method    string            `json:"method"`
	Space     float64           `json:"space"`
	Evaluated int64             `json:"evaluated"`
	Solves    int64             `json:"solves"`
	Bound     *float64          `json:"bound"`
	Shard     string            `json:"shard"`
	Rank      []string          `json:"rank"`
	Top       int               `json:"top"`
	Solutions []json.RawMessage `json:"solutions"`
}

// mergedSolution is one answer with what ranks it.
type mergedSolution struct {
	key     synth.ScoreKey
	members []rawMember
}

type rawMember struct {
	key string
	val json.RawMessage
}

// maxShardFile bounds a shard's JSON: 10,000 answers of a few kilobytes
// each at the most.
const maxShardFile = 64 << 20

// mergeShardFiles reads the shards' results and merges them into the
// result of one whole run.
func mergeShardFiles(files []string) (object, error) {
	docs, err := readShards(files)
	if err != nil {
		return nil, err
	}
	keys, err := shardRankKeys(docs[0])
	if err != nil {
		return nil, err
	}
	var all []mergedSolution
	var scores []synth.ScoreKey
	for _, d := range docs {
		for _, raw := range d.Solutions {
			s, err := readMergedSolution(raw)
			if err != nil {
				return nil, badInputf("%s: a solution: %v", d.file, err)
			}
			all = append(all, s)
			scores = append(scores, s.key)
		}
	}
	order, pareto := synth.RankMerged(keys, scores, docs[0].Top)
	sols := make([]object, len(order))
	for i, k := range order {
		o := object{}
		for _, m := range all[k].members {
			switch m.key {
			case "rank":
				o = append(o, member{"rank", i + 1})
			case "pareto":
				o = append(o, member{"pareto", pareto[i]})
			default:
				o = append(o, member{m.key, m.val})
			}
		}
		sols[i] = o
	}
	return mergedDoc(docs, sols), nil
}

// readShards reads the shards' results and checks that they are every
// shard of one search, each once.
func readShards(files []string) ([]*shardDoc, error) {
	var docs []*shardDoc
	seen := map[int]string{}
	n := 0
	for _, f := range files {
		data, err := constraints.ReadFile(f, maxShardFile, "a shard result")
		if err != nil {
			return nil, badInputf("%v", err)
		}
		d := &shardDoc{file: f}
		if err := json.Unmarshal(data, d); err != nil {
			return nil, badInputf("%s: not a fit result in JSON: %v", f, err)
		}
		var k, nn int
		if d.Shard == "" {
			return nil, badInputf("%s: not the result of fit --shard (no \"shard\" key)", f)
		}
		if k, nn, err = parseShard(d.Shard); err != nil {
			return nil, badInputf("%s: \"shard\": %v", f, err)
		}
		if n == 0 {
			n = nn
		}
		if nn != n {
			return nil, badInputf("%s: shard %s is of %d shards, %s of %d", f, d.Shard, nn, docs[0].file, n)
		}
		if prev, ok := seen[k]; ok {
			return nil, badInputf("%s: shard %d/%d is already in %s", f, k, n, prev)
		}
		seen[k] = f
		if len(docs) > 0 {
			a := docs[0]
			if d.Name != a.Name || d.Space != a.Space || d.Top != a.Top || strings.Join(d.Rank, ",") != strings.Join(a.Rank, ",") {
				return nil, badInputf("%s: not a shard of the same search as %s (name, space, --top or rank differ)", f, a.file)
			}
		}
		docs = append(docs, d)
	}
	if len(docs) != n {
		var missing []string
		for k := 1; k <= n; k++ {
			if _, ok := seen[k]; !ok {
				missing = append(missing, fmt.Sprintf("%d/%d", k, n))
			}
		}
		return nil, badInputf("merge: shard %s missing", strings.Join(missing, ", "))
	}
	return docs, nil
}

// shardRankKeys reads a shard's "rank" keys (constraints.ParseRankKey).
func shardRankKeys(d *shardDoc) ([]constraints.RankKey, error) {
	var keys []constraints.RankKey
	for _, r := range d.Rank {
		k, ok := constraints.ParseRankKey(r)
		if !ok {
			return nil, badInputf("%s: unknown rank key %q", d.file, r)
		}
		keys = append(keys, k)
	}
	return keys, nil
}

// mergedDoc is the whole run's document: "evaluated" and "solves" summed,
// "exhaustive" only when every shard proved its part, the first shard's
// status that did not, and the smallest bound.
func mergedDoc(docs []*shardDoc, sols []object) object {
	exhaustive := true
	status := ""
	var evaluated, solves int64
	bound := math.Inf(1)
	for _, d := range docs {
		// A shard's own "exhaustive" is false (it covers part of the
		// space); its status says whether that part was proven.
		covered := d.Status == synth.Proven.String() || d.Status == synth.NoFeasible.String()
		exhaustive = exhaustive && covered
		if !covered && status == "" {
			status = d.Status
		}
		evaluated += d.Evaluated
		solves += d.Solves
		if d.Bound != nil {
			bound = math.Min(bound, *d.Bound)
		}
	}
	if status == "" {
		status = synth.Proven.String()
		if len(sols) == 0 {
			status = synth.NoFeasible.String()
		}
	}
	doc := object{
		{"name", docs[0].Name},
		{"exhaustive", exhaustive},
		{"status", status},
		{"method", docs[0].Method},
		{"space", docs[0].Space},
		{"evaluated", evaluated},
		{"solves", solves},
	}
	if !math.IsInf(bound, 1) {
		doc = append(doc, member{"bound", bound})
	}
	return append(doc, member{"solutions", sols})
}

// readMergedSolution keeps a solution's members in order and reads what
// ranks it (the values in the order written, which is part order).
func readMergedSolution(raw json.RawMessage) (mergedSolution, error) {
	var s mergedSolution
	members, err := orderedMembers(raw)
	if err != nil {
		return s, err
	}
	s.members = members
	for _, m := range members {
		var err error
		switch m.key {
		case "error":
			err = json.Unmarshal(m.val, &s.key.Error)
		case "power":
			err = json.Unmarshal(m.val, &s.key.Power)
		case "part_count":
			err = json.Unmarshal(m.val, &s.key.Parts)
		case "values":
			var vs []rawMember
			if vs, err = orderedMembers(m.val); err == nil {
				for _, v := range vs {
					var f float64
					if err = json.Unmarshal(v.val, &f); err != nil {
						break
					}
					s.key.Values = append(s.key.Values, f)
				}
			}
		}
		if err != nil {
			return s, fmt.Errorf("%q: %v", m.key, err)
		}
	}
	return s, nil
}

// orderedMembers splits a JSON object into its members, in order.
func orderedMembers(raw json.RawMessage) ([]rawMember, error) {
	dec := json.NewDecoder(bytes.NewReader(raw))
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return nil, fmt.Errorf("want an object")
	}
	var out []rawMember
	for dec.More() {
		t, err := dec.Token()
		if err != nil {
			return nil, err
		}
		k, _ := t.(string)
		var v json.RawMessage
		if err := dec.Decode(&v); err != nil {
			return nil, err
		}
		out = append(out, rawMember{k, v})
	}
	return out, nil
}
