package plans

import (
	"bufio"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"sync"
)

// A Journal records every finished job of a sweep, so that an interrupted
// run (even by kill -9) resumes where it stopped and shards on different
// machines can be merged. Each job is keyed by a hash of everything that
// determines its numbers (object, noise level, sampling, method, seed and
// draw), not by its position in the plan, so an edited plan recomputes only
// the jobs its edit changes.
//
// The journal is a folder of append-only JSON-lines files, one per writer
// (a local run or a shard), plus one binary file per kept image. A line is
// appended, and the file synced, only after the job's image file is
// complete; a line cut short by a crash is ignored when the journal is read.
type Journal struct {
	dir     string
	mu      sync.Mutex
	f       *os.File
	entries map[string]journalEntry
}

// journalEntry is one line of a journal file.
type journalEntry struct {
	Version int     `json:"v"`
	Key     string  `json:"key"`
	Tuning  *Tuning `json:"tuning,omitempty"`
	Result  *Result `json:"result,omitempty"`
	Image   string  `json:"image,omitempty"` // file in the journal folder
}

const journalVersion = 1

// JournalDir returns the journal folder used for the results folder out: a
// hidden sibling, so that swapping the results folder in place never touches
// it.
func JournalDir(out string) string {
	out = filepath.Clean(out)
	return filepath.Join(filepath.Dir(out), "."+filepath.Base(out)+".journal")
}

// OpenJournal reads every journal file in dir (creating dir if needed) and
// opens writer's file for appending. writer names this process's file, e.g.
// "local" or "shard-3-of-8".
func OpenJournal(dir, writer string) (*Journal, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("cannot create the journal folder %s: %w", dir, err)
	}
	j := &Journal{dir: dir, entries: map[string]journalEntry{}}
	files, err := filepath.Glob(filepath.Join(dir, "*.jsonl"))
	if err != nil {
		return nil, err
	}
	sort.Strings(files)
	for _, name := range files {
		// Only regular files hold entries; anything else (a device, a
		// folder) is not read, so it cannot stall or flood the reader.
		if fi, err := os.Stat(name); err != nil || !fi.Mode().IsRegular() {
			continue
		}
		if err := j.load(name); err != nil {
			return nil, err
		}
	}
	f, err := os.OpenFile(filepath.Join(dir, writer+".jsonl"), os.O_WRONLY|os.O_CREATE|os.O_APPEND, 0o644)
	if err != nil {
		return nil, fmt.Errorf("cannot write the journal: %w", err)
	}
	j.f = f
	return j, nil
}

func (j *Journal) load(name string) error {
	f, err := os.Open(name)
	if err != nil {
		return fmt.Errorf("cannot read the journal: %w", err)
	}
	defer f.Close()
	r := bufio.NewReader(f)
	for {
		line, err := r.ReadBytes('\n')
		if len(line) > 0 && line[len(line)-1] == '\n' {
			var e journalEntry
			// A line that does not parse is the torn tail of a crashed
			// writer or foreign junk: the job is simply done again.
			if json.Unmarshal(line, &e) == nil && e.Version == journalVersion && e.Key != "" {
				j.entries[e.Key] = e
			}
		}
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return fmt.Errorf("cannot read the journal %s: %w", name, err)
		}
	}
}

// Len returns the number of jobs the journal holds.
func (j *Journal) Len() int {
	j.mu.Lock()
	defer j.mu.Unlock()
	return len(j.entries)
}

// Close closes the journal file.
func (j *Journal) Close() error {
	if j == nil || j.f == nil {
		return nil
	}
	return j.f.Close()
}

func (j *Journal) lookup(key string) (journalEntry, bool) {
	if j == nil {
		return journalEntry{}, false
	}
	j.mu.Lock()
	defer j.mu.Unlock()
	e, ok := j.entries[key]
	return e, ok
}

// readImage returns the image of entry e, or an error if it is missing or
// of the wrong size.
func (j *Journal) readImage(e journalEntry, n int) ([]float64, error) {
	b, err := os.ReadFile(filepath.Join(j.dir, e.Image))
	if err != nil {
		return nil, err
	}
	if len(b) != 8*n {
		return nil, fmt.Errorf("journal image %s has %d bytes, want %d", e.Image, len(b), 8*n)
	}
	img := make([]float64, n)
	for i := range img {
		img[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return img, nil
}

// record appends e, writing img first when it is not nil.
func (j *Journal) record(e journalEntry, img []float64) error {
	if j == nil {
		return nil
	}
	e.Version = journalVersion
	if img != nil {
		e.Image = "img-" + e.Key + ".f64"
		b := make([]byte, 8*len(img))
		for i, v := range img {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
		}
		if err := writeFileSync(filepath.Join(j.dir, e.Image), b); err != nil {
			return fmt.Errorf("journal: %w", err)
		}
	}
	line, err := json.Marshal(e)
	if err != nil {
		return fmt.Errorf("journal: %w", err)
	}
	line = append(line, '\n')
	j.mu.Lock()
	defer j.mu.Unlock()
	if _, err := j.f.Write(line); err != nil {
		return fmt.Errorf("journal: %w (is the disk full?)", err)
	}
	if err := j.f.Sync(); err != nil {
		return fmt.Errorf("journal: %w", err)
	}
	j.entries[e.Key] = e
	return nil
}

// writeFileSync writes b to path through a temporary file, synced and
// renamed, so a reader never sees part of it.
func writeFileSync(path string, b []byte) error {
	tmp := path + ".tmp"
	f, err := os.Create(tmp)
	if err != nil {
		return err
	}
	if _, err := f.Write(b); err != nil {
		f.Close()
		os.Remove(tmp)
		return err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		os.Remove(tmp)
		return err
	}
	if err := f.Close(); err != nil {
		os.Remove(tmp)
		return err
	}
	return os.Rename(tmp, path)
}

// buildID identifies the running binary by the SHA-256 of its file, so that
// journal entries made by different code are never reused: a rebuilt binary
// recomputes, the same binary (a resumed run, every shard of a cluster job)
// shares its entries.
var buildID = sync.OnceValue(func() string {
	exe, err := os.Executable()
	if err != nil {
		return "unknown-binary"
	}
	f, err := os.Open(exe)
	if err != nil {
		return "unknown-binary"
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "unknown-binary"
	}
	return hex.EncodeToString(h.Sum(nil)[:12])
})

// contentKey hashes the JSON encoding of parts, and the binary that computes
// them, into a short hex key: the identity of a journal entry.
func contentKey(parts ...any) string {
	return hashParts(buildID(), parts)
}

// planKey hashes the JSON encoding of parts alone into a short hex key. Seeds
// derive from plan keys, never from content keys, so that the random draws
// are fixed by the plan and stay the same from one build of the program to
// the next (a rebuilt binary recomputes its journal entries, with the same
// masks and noise).
func planKey(parts ...any) string {
	return hashParts("plan", parts)
}

func hashParts(prefix string, parts []any) string {
	h := sha256.New()
	io.WriteString(h, prefix)
	enc := json.NewEncoder(h)
	for _, p := range parts {
		if err := enc.Encode(p); err != nil {
			panic("plans: key of unencodable value: " + err.Error())
		}
	}
	return hex.EncodeToString(h.Sum(nil)[:12])
}

// candidateKeys identify a candidate by what fixes its data: the seed, the
// object, the noise level, the gradient system (for spirals), the scheme's
// definition (not its label) and the acceleration. The content key (with the
// binary) names its journal entries, the plan key roots its seeds.
func candidateKeys(p *Plan, s Scheme, r float64) (content, seed string) {
	s.Label = ""
	s.Accelerations = nil
	s.Interleaves = nil
	sc := p.Scanner
	sc.TRms, sc.EchoTrain, sc.Averages = 0, 0, 0 // scan time only
	parts := []any{"candidate", p.Seed, p.Object, p.imageHash, sc, s, r}
	return contentKey(parts...), planKey(parts...)
}

// reconKey identifies a reconstruction method by its definition.
func reconKey(r Recon) string {
	r.Label = ""
	return contentKey("recon", r)
}

// reconSeedKey is the plan key of a reconstruction method, the root of the
// seeds it draws (the random shifts of cycle spinning).
func reconSeedKey(r Recon) string {
	r.Label = ""
	return planKey("recon", r)
}

// ErrIncomplete is returned by a run that must not compute (a merge) when
// some jobs are not in the journal.
var ErrIncomplete = errors.New("the journal does not hold every job of the plan")

// shardName is the journal writer name of shard i (0-based) of n.
func shardName(i, n int) string {
	if n <= 1 {
		return "local"
	}
	return fmt.Sprintf("shard-%d-of-%d", i+1, n)
}

// WriterName returns the journal file name a run with these options writes.
func (o Options) WriterName() string { return shardName(o.Shard, o.Shards) }
