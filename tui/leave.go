package tui

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"

	"scorewright/generator/design"
)

// leaveAction is something the user asked for that would drop the design
// being edited: leaving the workbench or putting another design in its
// place.
type leaveAction int

const (
	leaveQuit   leaveAction = iota // q, or ctrl+c
	leaveDemo                      // the next demo design
	leaveOpen                      // open a design file
	leavePreset                    // a preset's formula over one written by hand
	leaveNew                       // a new, blank design
)

// what names the action in the prompt.
func (a leaveAction) what() string {
	switch a {
	case leaveDemo:
		return "Switching to the next demo"
	case leaveOpen:
		return "Opening another design"
	case leavePreset:
		return "Taking the preset's formula"
	case leaveNew:
		return "Starting a new design"
	}
	return "Quitting"
}

// goOn names what discarding does, for the prompt's key line.
func (a leaveAction) goOn() string {
	switch a {
	case leaveDemo:
		return "switch without saving"
	case leaveOpen:
		return "choose a file without saving"
	case leavePreset:
		return "replace the formula"
	case leaveNew:
		return "start it without saving"
	}
	return "quit without saving"
}

// leavePrompt is a pending action that waits for the user's answer to
// "the design has unsaved changes". replay is the key that asked for it,
// handed to the pane once the user agrees (a preset pick).
type leavePrompt struct {
	action leaveAction
	replay tea.KeyMsg
}

// leave does action at once when nothing would be lost, and otherwise asks
// first (save, go on without saving, or stay).
func (m *Model) leave(action leaveAction, km tea.KeyMsg) tea.Cmd {
	if !m.Unsaved() {
		return m.doLeave(leavePrompt{action: action, replay: km}, false)
	}
	if action != leavePreset { // the picker stays open to take the key
		m.stopTyping()
	}
	m.leaving = &leavePrompt{action: action, replay: km}
	return nil
}

// leaveKey answers the unsaved-changes prompt.
func (m *Model) leaveKey(km tea.KeyMsg) tea.Cmd {
	k, p := m.keys, *m.leaving
	switch {
	case key.Matches(km, k.SaveFirst):
		m.leaving = nil
		m.afterSave = &p
		m.openDialog(dialogSave)
	case key.Matches(km, k.Discard):
		m.leaving = nil
		return m.doLeave(p, true)
	case key.Matches(km, k.QuitHard) && p.action == leaveQuit:
		// ctrl+c twice: out at once; the recovery file keeps the edits.
		return m.quit()
	case key.Matches(km, k.Cancel):
		m.leaving = nil
		m.status = "kept the design; nothing was dropped"
	}
	return nil
}

// doLeave carries out an action the user agreed to (or that loses
// nothing). discarded says unsaved edits are being dropped on purpose, so
// their recovery file goes too.
func (m *Model) doLeave(p leavePrompt, discarded bool) tea.Cmd {
	switch p.action {
	case leaveQuit:
		if discarded {
			m.dropRecovery()
		}
		return m.quit()
	case leaveDemo:
		if discarded {
			m.dropRecovery()
		}
		m.demoIndex = (m.demoIndex + 1) % len(demos())
		m.path = ""
		cmd := m.replaceDesign(demos()[m.demoIndex]())
		m.status = "demo design: " + m.d.Title
		return cmd
	case leaveNew:
		if discarded {
			m.dropRecovery()
		}
		m.path = ""
		cmd := m.replaceDesign(NewDesign())
		m.status = "a new design: name it in the terms (" + m.keys.Terms.Help().Key + "), write H(p) in the formula"
		return cmd
	case leaveOpen:
		// The design is dropped only once the new one is read; its
		// recovery file goes then (openedMsg).
		m.openDialog(dialogOpen)
		return nil
	case leavePreset:
		return m.designKey(p.replay)
	}
	return nil
}

// savedThen continues the action that waited for a save.
func (m *Model) savedThen() tea.Cmd {
	p := m.afterSave
	m.afterSave = nil
	if p == nil {
		return nil
	}
	return m.doLeave(*p, false)
}

// handWritten reports whether the formula is the user's own, not a
// preset's: a preset pick would replace it.
func handWritten(d *design.Design) bool {
	return d.Preset == "" && strings.TrimSpace(d.Formula) != ""
}

// leaveView is the unsaved-changes prompt.
func (m *Model) leaveView() string {
	p, k, st := m.leaving, m.keys, m.st
	name := "The design"
	if m.path != "" {
		name = filepath.Base(m.path)
	}
	lines := []string{
		st.Header.Render(p.action.what() + " would drop unsaved changes"),
		"",
		fmt.Sprintf("%s has changes that are not saved.", name),
		"",
		st.Key.Render(k.SaveFirst.Help().Key) + "    save first, then go on",
		st.Key.Render(k.Discard.Help().Key) + "    " + p.action.goOn(),
		st.Key.Render(k.Cancel.Help().Key) + "  keep editing",
	}
	if p.action == leaveQuit {
		lines = append(lines, "", st.Dim.Render(k.QuitHard.Help().Key+" again quits at once; the edits stay in the recovery file"))
	}
	return m.promptBox(lines)
}

// promptBox frames a prompt's lines as a dialog of the screen's width.
func (m *Model) promptBox(lines []string) string {
	w := min(m.width-4, 64)
	for i, l := range lines {
		// Long lines wrap inside the box (the frame's padding is 2).
		lines[i] = lipgloss.NewStyle().Width(w - 2).Render(l)
	}
	return m.st.Dialog.Width(w).Render(strings.Join(lines, "\n"))
}
