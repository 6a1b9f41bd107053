package tui

import (
	"context"
	"errors"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/viewport"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
	"scorewright/tui/recovery"
)

// MinWidth and MinHeight are the smallest terminal the workbench draws in.
const (
	MinWidth  = 80
	MinHeight = 24
)

// pane names the panes in focus order.
type pane int

const (
	paneDesign pane = iota
	panePicture
	paneChecks
	paneBudget
	paneCount
)

// Messages of the file operations.
type (
	// Every result carries the dialog it answers (seq) and the design
	// generation it was asked at, so that a late answer never lands on a
	// later dialog or over a design that changed meanwhile.
	savedMsg struct {
		path string
		gen  uint64 // the generation that was saved
		seq  uint64
		err  error
	}
	openedMsg struct {
		path string
		d    *design.Design
		gen  uint64
		seq  uint64
		err  error
		note string // what opening changed in the file's design
	}
	exportedMsg struct {
		files []string
		gen   uint64
		seq   uint64
		err   error
	}
)

// Model is the workbench. Create it with New; it is a tea.Model.
type Model struct {
	set  Settings
	st   Styles
	keys KeyMap

	width, height int
	d             *design.Design
	path          string // where the design was loaded from or saved to
	gen           uint64 // generation of the design; bumped on every edit
	dialogSeq     uint64 // serial number of the last dialog opened
	// stopDialog cancels the read an open dialog started; nil when none.
	stopDialog   context.CancelFunc
	comp         *compiled
	compGen      uint64
	debouncedGen uint64
	fitGen       uint64

	ctx       context.Context
	cancelAll context.CancelFunc
	// The background work, one job each (tui/job.go): run ids, the
	// generation each run is for, and cancellation.
	checkJob, certJob, fitJob, picJob, btJob, riskJob job
	history                                           string // the forecast history the backtest replays ("" none)
	showBT                                            bool   // the backtest view replaces the panes
	bt                                                BacktestView
	showRisk                                          bool // the risk view replaces the panes
	risk                                              RiskView
	research                                          *ResearchRoom // the research view (tui/research.go) replaces the panes when shown
	terms                                             *TermsRoom    // the annex's terms (tui/terms.go) replace the panes when shown
	demoIndex                                         int
	savedGen                                          uint64       // generation last opened or saved
	leaving                                           *leavePrompt // the unsaved-changes prompt, when open
	afterSave                                         *leavePrompt // an action waiting for the save dialog to succeed
	rec                                               *recovery.Store
	recReady                                          bool           // the look for a previous run's edits has answered
	recOffer                                          *recoveryOffer // edits a previous run left, offered at start
	recKey                                            string         // the design path the last recovery write was for
	recWrote                                          bool           // a recovery file of this run may exist
	focus                                             pane
	lower                                             pane // which of checks/budget the small layout shows
	designPane                                        DesignPane
	picture                                           PicturePane
	checks                                            ChecksPane
	budget                                            BudgetPane
	dialog                                            *fileDialog
	// exportFormat and exportLottery are what the last export asked for,
	// so the next export dialog starts there.
	exportFormat  string
	exportLottery bool
	help          bool
	helpView      viewport.Model
	status        string
	quitting      bool

	// updates counts Update calls, for tests that watch responsiveness.
	updates int64
}

// New returns a workbench on design d (nil: the frost-night demo). path is
// where d came from ("" for none).
func New(d *design.Design, path string, set Settings, st Styles) *Model {
	if d == nil {
		d = DemoFrost()
	}
	if set.Checker == nil {
		set.Checker = defaultChecker()
		// The certificate goes with the build's checks; a test's own
		// checker gets one only when it sets a Certifier too.
		if set.Certifier == nil {
			set.Certifier = defaultCertifier()
		}
	}
	if set.Fitter == nil {
		set.Fitter = defaultFitter()
	}
	if set.Exporter == nil {
		set.Exporter = defaultExporter(set.Version)
	}
	keys := DefaultKeyMap()
	ctx, cancel := context.WithCancel(context.Background())
	d = cloneDesign(d)
	folded := foldParams(d)
	m := &Model{
		set: set, st: st, keys: keys, d: cloneDesign(d), path: path,
		ctx: ctx, cancelAll: cancel, gen: 1, savedGen: 1, lower: paneChecks,
		designPane: NewDesignPane(st, keys, d),
		picture:    NewPicturePane(st, keys),
		checks:     NewChecksPane(st, keys, set.Checker != nil),
		budget:     NewBudgetPane(st, keys, set.Fitter != nil),
		helpView:   viewport.New(40, 10),
		bt:         NewBacktestView(st, keys),
		risk:       NewRiskView(st, keys, d),
		research:   NewResearchRoom(st, keys, d),
		terms:      NewTermsRoom(st, keys),
	}
	if set.RecoveryDir != "" {
		m.rec = recovery.New(set.RecoveryDir)
	}
	m.helpView.KeyMap = viewport.KeyMap{Up: keys.Up, Down: keys.Down, PageUp: keys.PageUp, PageDown: keys.PageDown}
	m.designPane.Focus()
	m.designPane.foldedNote(folded)
	m.checks.edited()
	return m
}

// Init starts compiling the design.
func (m *Model) Init() tea.Cmd {
	return tea.Batch(compileCmd(m.gen, cloneDesign(m.d)), m.debounce(), m.findRecovery())
}

// Design returns a copy of the design being edited.
func (m *Model) Design() *design.Design { return cloneDesign(m.d) }

// Generation is the design's generation number.
func (m *Model) Generation() uint64 { return m.gen }

// CheckReport is the last finished check report, or nil.
func (m *Model) CheckReport() *CheckReport { return m.checks.Report() }

// Checking reports whether a check runs in the background.
func (m *Model) Checking() bool { return m.checks.Running() }

// Backtest is the last finished backtest, or nil.
func (m *Model) Backtest() *BacktestResult { return m.bt.Result() }

// BacktestShown reports whether the backtest view is open.
func (m *Model) BacktestShown() bool { return m.showBT }

// BacktestRunning reports whether a backtest runs in the background.
func (m *Model) BacktestRunning() bool { return m.bt.Running() }

// RiskShown reports whether the risk view is open.
func (m *Model) RiskShown() bool { return m.showRisk }

// Risk is the last finished risk result, or nil.
func (m *Model) Risk() *RiskResult { return m.risk.Result() }

// RiskRunning reports whether a risk run is in progress.
func (m *Model) RiskRunning() bool { return m.risk.Running() }

// RiskInputs are the risk view's current inputs.
func (m *Model) RiskInputs() RiskInputs { return m.risk.in }

// Status is the status line's message.
func (m *Model) Status() string { return m.status }

// Close cancels every background job and stops recovery writes; call it
// after the program ends.
func (m *Model) Close() {
	m.cancelAll()
	if m.rec != nil {
		m.rec.Close()
	}
}

// Update routes a message. It does no work itself: everything slow runs in
// the commands it returns.
func (m *Model) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	m.updates++
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		m.width, m.height = msg.Width, msg.Height
		m.layout()
		return m, m.requestPicture()
	case tea.KeyMsg:
		return m, m.key(msg)
	case streamMsg:
		_, cmd := m.Update(msg.msg)
		if m.wanted(msg.msg) {
			return m, tea.Batch(cmd, msg.next)
		}
		return m, cmd
	case savedMsg, openedMsg, exportedMsg, completedMsg, recoveryFoundMsg, recoveryDoneMsg:
		return m, m.fileMsg(msg)
	}
	return m, m.jobMsg(msg)
}

// jobMsg takes the answers of background work on the design: compiling,
// the debounce, the picture, the checks, the fit and the views' runs.
func (m *Model) jobMsg(msg tea.Msg) tea.Cmd {
	switch msg := msg.(type) {
	case compiledMsg:
		if msg.gen != m.gen {
			return nil
		}
		m.comp, m.compGen = msg.c, msg.gen
		m.designPane.setCompiled(msg.c)
		if msg.c.ok() {
			m.picture.setDesign(msg.c.d.N(), msg.c.reward(), m.payFunc() != nil, msg.c.onInterval())
		} else {
			m.checks.block("the formula does not compile")
			m.picture.noDesign("nothing to draw until the formula compiles")
		}
		return tea.Batch(m.requestPicture(), m.maybeStart())
	case debounceMsg:
		if msg.gen != m.gen {
			return nil
		}
		m.debouncedGen = msg.gen
		return tea.Batch(m.maybeStart(), m.writeRecovery())
	case pictureMsg:
		if msg.gen == m.gen {
			m.picture.show(msg)
		}
		return nil
	case checkRunMsg:
		if !m.checkJob.current(msg.run) {
			return nil
		}
		switch inner := msg.msg.(type) {
		case checkProgressMsg:
			m.checks.progressed(inner.done, inner.total)
		case checkDoneMsg:
			if errors.Is(inner.err, context.Canceled) {
				return nil
			}
			m.checks.finished(inner.report, inner.err)
			if inner.err == nil {
				return m.startCertificate()
			}
		}
		return nil
	case certRunMsg:
		m.certMsg(msg)
		return nil
	case proposeProgressMsg, proposeDoneMsg:
		m.proposeMsg(msg)
		return nil
	case fitProgressMsg:
		if msg.gen == m.gen {
			m.budget.progressed(msg.done, msg.total)
		}
		return nil
	case fitMsg:
		if msg.gen != m.gen || errors.Is(msg.err, context.Canceled) {
			return nil
		}
		m.fitGen = msg.gen
		m.budget.setTable(msg.table, msg.err)
		if m.comp.ok() {
			m.picture.setDesign(m.comp.d.N(), m.comp.reward(), m.payFunc() != nil, m.comp.onInterval())
		}
		return m.requestPicture()
	case btRunMsg:
		return m.backtestMsg(msg)
	case riskRunMsg:
		m.riskMsg(msg)
		return nil
	case researchRunMsg:
		m.research.Msg(msg)
		return nil
	}
	return nil
}

// fileMsg takes the answers of file work: save, open, export, completion
// and the recovery file.
func (m *Model) fileMsg(msg tea.Msg) tea.Cmd {
	switch msg := msg.(type) {
	case savedMsg:
		gen := msg.gen
		return m.fileDone(msg.seq, msg.err, func() {
			m.path = msg.path
			// The file's folder is the design's now: a relative menu path
			// is rewritten to name the same file from there, as Save
			// wrote it.
			m.d.MoveTo(filepath.Dir(msg.path))
			m.savedGen = gen
			if !m.Unsaved() {
				m.dropRecovery()
			}
			m.status = "saved the design to " + msg.path
		}, m.savedThen)
	case openedMsg:
		if msg.err == nil && msg.gen != m.gen {
			msg.err = errors.New("the design changed while the file was read; open it again")
		}
		return m.fileDone(msg.seq, msg.err, func() {
			m.dropRecovery() // the user agreed to drop the old design's edits
			m.status = "opened " + msg.path
			if msg.note != "" {
				m.status += "; note: " + msg.note
			}
			m.path = msg.path
		}, func() tea.Cmd { return m.replaceDesign(msg.d) })
	case completedMsg:
		if m.dialog != nil {
			m.dialog.completed(msg)
		}
		return nil
	case recoveryFoundMsg:
		m.foundRecovery(msg)
		return nil
	case recoveryDoneMsg:
		if msg.err != nil {
			m.status = msg.err.Error()
		} else if msg.note != "" {
			m.status = msg.note
		}
		return nil
	case exportedMsg:
		return m.fileDone(msg.seq, msg.err, func() {
			m.status = "exported: " + strings.Join(msg.files, ", ")
		})
	}
	return nil
}

// edited starts a new generation after the design changed: running work
// for the old one is cancelled, the formula is recompiled at once and the
// checks wait out the debounce.
func (m *Model) edited() tea.Cmd {
	m.gen++
	// Answers of the runs for the old design are now stale.
	m.checkJob.drop()
	m.certJob.drop()
	m.fitJob.stop()
	m.checks.edited()
	m.budget.edited()
	if m.history != "" {
		m.btJob.drop()
		m.bt.edited()
	}
	m.riskJob.drop()
	m.risk.edited()
	defer m.refreshRisk()
	m.research.Edited(m.d)
	m.risk.designChanged(m.d)
	m.status = ""
	return tea.Batch(compileCmd(m.gen, cloneDesign(m.d)), m.debounce())
}

// replaceDesign swaps in a whole new design (opened or demo).
func (m *Model) replaceDesign(d *design.Design) tea.Cmd {
	m.d = cloneDesign(d)
	folded := foldParams(m.d)
	m.designPane.reset(m.d)
	m.designPane.foldedNote(folded)
	// A new design's wealth follows its budget again.
	m.risk.newDesign()
	m.budget.setTable(nil, nil)
	cmd := m.edited()
	m.savedGen = m.gen
	return cmd
}

func (m *Model) quit() tea.Cmd {
	m.quitting = true
	m.cancelAll()
	return tea.Quit
}

func (m *Model) setFocus(p pane) {
	m.designPane.Blur()
	m.picture.Blur()
	m.checks.Blur()
	m.budget.Blur()
	m.focus = p
	switch p {
	case paneDesign:
		m.designPane.Focus()
	case panePicture:
		m.picture.Focus()
	case paneChecks:
		m.checks.Focus()
		m.lower = paneChecks
	case paneBudget:
		m.budget.Focus()
		m.lower = paneBudget
	}
}

// stopTyping ends any editing in the panes before a view replaces them.
func (m *Model) stopTyping() {
	m.designPane.stopEditing()
	if m.budget.Typing() {
		m.budget.Blur()
		m.budget.Focus()
	}
}
