package verify

import (
	"bufio"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"

	"scorewright/internal/simplex"
)

// bytesPerSample is what one sampled lattice point costs a check of n
// outcomes, counted from the arrays the check keeps per point (its
// coordinates, the efforts of it as a report, H and the flags, the
// sampler's duplicate test) with room for the slices' headers.
func bytesPerSample(n int) int64 { return int64(48*n + 256) }

// MaxSamples is the largest Settings.Samples this machine can hold for n
// outcomes: the sample may take at most half of the memory available now
// (MemAvailable in /proc/meminfo, 1 GiB where that cannot be read). The
// second value is that memory, for the message.
func MaxSamples(n int) (int, int64) {
	avail := availableMemory()
	return int(avail / 2 / bytesPerSample(n)), avail
}

// MaxFullPoints is the largest full grid this machine can hold for n
// outcomes, the default Settings.MaxPoints: like a sample, the grid may
// take at most half of the memory available now, and never more points
// than simplex.Full enumerates.
func MaxFullPoints(n int) int {
	most, _ := MaxSamples(n)
	return min(most, simplex.MaxFull)
}

// sampledNote says that a check used a sample of size points (the
// vertices among them) and why: the full lattice is above the limit,
// which is either the caller's or what the machine holds.
func sampledNote(s Settings, n, size int) string {
	why := "the limit asked for"
	if !s.maxPointsAsked {
		if most, avail := MaxSamples(n); most < simplex.MaxFull {
			why = fmt.Sprintf("what half of the %d MiB of memory available holds at about %d bytes a point", avail>>20, bytesPerSample(n))
		} else {
			why = "the most points the grid enumerator lists"
		}
	}
	return fmt.Sprintf("the full lattice at resolution %d has %s points, more than the limit of %d (%s), so %d random lattice points and the vertices were used; a smaller resolution or a larger limit gives a full grid",
		s.Resolution, latticeSize(simplex.Count(n, s.Resolution)), s.MaxPoints, why, size-n)
}

// MaxWorkers is the most goroutines a check is given: more than a few per
// core only adds scratch space (one scorer per worker) and contention.
func MaxWorkers() int { return max(64, 16*runtime.NumCPU()) }

// CheckCapacity refuses settings this machine cannot hold, naming the cap.
func CheckCapacity(s Settings, n int) error {
	if s.Workers > MaxWorkers() {
		return fmt.Errorf("workers: %d is more than this machine can use (at most %d: 16 per core on %d cores, at least 64)", s.Workers, MaxWorkers(), runtime.NumCPU())
	}
	if s.MaxPoints > MaxFullPoints(n) {
		_, avail := MaxSamples(n)
		return fmt.Errorf("max-points: %d is more than this machine can hold for %d outcomes (at most %d: half of the %d MiB of memory available at about %d bytes a point, and at most %d)", s.MaxPoints, n, MaxFullPoints(n), avail>>20, bytesPerSample(n), simplex.MaxFull)
	}
	if most, avail := MaxSamples(n); s.Samples > most {
		return fmt.Errorf("samples: %d is more than this machine can hold for %d outcomes (at most %d, half of the %d MiB of memory available at about %d bytes a point)", s.Samples, n, most, avail>>20, bytesPerSample(n))
	}
	return nil
}

func availableMemory() int64 {
	const fallback = 1 << 30
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return fallback
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if len(fields) >= 2 && fields[0] == "MemAvailable:" {
			if kb, err := strconv.ParseInt(fields[1], 10, 64); err == nil && kb > 0 {
				return kb << 10
			}
		}
	}
	return fallback
}
