package tui

import (
	"bytes"
	"fmt"
	"path/filepath"
	"time"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
	"scorewright/tui/recovery"
)

// Messages of the recovery file (tui/recovery).
type (
	// recoveryFoundMsg answers the look for edits a previous run left.
	recoveryFoundMsg struct {
		offer *recoveryOffer // nil: nothing to offer
		note  string         // what happened to a file that could not be offered
	}
	// recoveryDoneMsg answers a write, or what the user chose for an offer.
	recoveryDoneMsg struct {
		note string // for the status line ("" nothing to say)
		err  error
	}
)

// recoveryOffer is a recovery file found at start, read and ready.
type recoveryOffer struct {
	entry *recovery.Entry
	d     *design.Design
}

// findRecovery looks for edits left by a workbench that ended without
// saving them. A file that does not read as a design is set aside, never
// deleted, and the status says where it went.
func (m *Model) findRecovery() tea.Cmd {
	if m.rec == nil {
		m.recReady = true
		return nil
	}
	st, path, cur := m.rec, m.path, cloneDesign(m.d)
	return func() tea.Msg {
		e, err := st.Find(path)
		if err != nil {
			return recoveryFoundMsg{note: "a recovery file could not be read: " + err.Error()}
		}
		if e == nil {
			return recoveryFoundMsg{}
		}
		d, err := design.Decode(e.Design)
		if err == nil {
			_, err = prepareDesign(d)
		}
		if err != nil {
			to, aerr := st.SetAside(e)
			if aerr != nil {
				return recoveryFoundMsg{note: fmt.Sprintf("the recovery file %s does not read as a design (%v)", e.File, err)}
			}
			return recoveryFoundMsg{note: fmt.Sprintf("a recovery file did not read as a design (%v); it is kept as %s", err, to)}
		}
		if b, err := cur.Encode(); err == nil && e.Of == absPath(path) {
			if c, err := d.Encode(); err == nil && bytes.Equal(b, c) {
				_ = st.Discard(e) // the same as the file opened: nothing to recover
				return recoveryFoundMsg{}
			}
		}
		return recoveryFoundMsg{offer: &recoveryOffer{entry: e, d: d}}
	}
}

func absPath(p string) string {
	if p == "" {
		return ""
	}
	if a, err := filepath.Abs(p); err == nil {
		return a
	}
	return p
}

// foundRecovery takes the answer of findRecovery.
func (m *Model) foundRecovery(msg recoveryFoundMsg) {
	m.recReady = true
	m.recOffer = msg.offer
	if msg.note != "" {
		m.status = msg.note
	}
	if msg.offer != nil {
		m.stopTyping()
	}
}

// writeRecovery keeps the unsaved design in its recovery file. It runs
// once the edits settle (the debounce), so typing does not write on every
// key; the ticket is taken now, so writes land in the order asked.
func (m *Model) writeRecovery() tea.Cmd {
	if m.rec == nil || !m.recReady || m.recOffer != nil || !m.Unsaved() {
		return nil
	}
	st, d, path, old := m.rec, cloneDesign(m.d), m.path, m.recKey
	wrote := m.recWrote
	t := st.Ticket()
	m.recKey, m.recWrote = path, true
	return func() tea.Msg {
		b, err := d.Encode()
		if err == nil {
			err = st.Write(t, path, b, time.Now())
		}
		if err == nil && wrote && absPath(old) != absPath(path) {
			err = st.Remove(t, old) // the edits now live under the new name
		}
		if err != nil {
			return recoveryDoneMsg{err: fmt.Errorf("the recovery file could not be written: %w", err)}
		}
		return recoveryDoneMsg{}
	}
}

// dropRecovery removes the recovery file once the edits are saved or the
// user chose to drop them. It runs at once, not in a command, because it
// often comes right before the program ends; it is one small unlink.
func (m *Model) dropRecovery() {
	if m.rec == nil || !m.recWrote {
		return
	}
	t := m.rec.Ticket()
	_ = m.rec.Remove(t, m.recKey)
	if absPath(m.path) != absPath(m.recKey) {
		_ = m.rec.Remove(t, m.path)
	}
	m.recWrote = false
}

// recoveryKey answers the offer of a recovery file found at start.
func (m *Model) recoveryKey(km tea.KeyMsg) tea.Cmd {
	k, o, st := m.keys, m.recOffer, m.rec
	switch {
	case key.Matches(km, k.QuitHard):
		return m.quit() // the file stays for the next start
	case key.Matches(km, k.Restore):
		m.recOffer = nil
		m.path = o.entry.Of
		if m.path != "" {
			o.d.Dir = filepath.Dir(absPath(m.path)) // a relative menu path is the file's
		}
		cmd := m.replaceDesign(o.d)
		m.savedGen = 0 // the restored edits are still unsaved
		m.status = fmt.Sprintf("restored the unsaved edits of %s from %s; save them with %s", offerName(o), o.entry.Written.Local().Format("2 Jan 15:04"), k.Save.Help().Key)
		return cmd
	case key.Matches(km, k.Discard):
		m.recOffer = nil
		return func() tea.Msg {
			if err := st.Discard(o.entry); err != nil {
				return recoveryDoneMsg{err: err}
			}
			return recoveryDoneMsg{note: "dropped the recovered edits of " + offerName(o)}
		}
	case key.Matches(km, k.Cancel):
		m.recOffer = nil
		return func() tea.Msg {
			to, err := st.SetAside(o.entry)
			if err != nil {
				return recoveryDoneMsg{err: err}
			}
			return recoveryDoneMsg{note: "kept the recovered edits as " + to + "; open it with " + k.Open.Help().Key}
		}
	}
	return nil
}

func offerName(o *recoveryOffer) string {
	if o.entry.Of == "" {
		return "a design never saved (" + o.d.Title + ")"
	}
	return filepath.Base(o.entry.Of)
}

// recoveryView is the offer of a recovery file.
func (m *Model) recoveryView() string {
	o, k, st := m.recOffer, m.keys, m.st
	lines := []string{
		st.Header.Render("Unsaved edits were kept from the last session"),
		"",
		fmt.Sprintf("Edits of %s, written %s, were not saved when the workbench last ended.", offerName(o), o.entry.Written.Local().Format("2 Jan 15:04")),
		"",
		st.Key.Render(k.Restore.Help().Key) + "    restore them (still unsaved)",
		st.Key.Render(k.Discard.Help().Key) + "    drop them for good",
		st.Key.Render(k.Cancel.Help().Key) + "  not now: keep them as a design file to open later",
	}
	return m.promptBox(lines)
}
