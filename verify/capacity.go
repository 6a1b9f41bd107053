package verify

import (
	"bufio"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"
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

// MaxWorkers is the most goroutines a check is given: more than a few per
// core only adds scratch space (one scorer per worker) and contention.
func MaxWorkers() int { return max(64, 16*runtime.NumCPU()) }

// CheckCapacity refuses settings this machine cannot hold, naming the cap.
func CheckCapacity(s Settings, n int) error {
	if s.Workers > MaxWorkers() {
		return fmt.Errorf("workers: %d is more than this machine can use (at most %d: 16 per core on %d cores, at least 64)", s.Workers, MaxWorkers(), runtime.NumCPU())
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
