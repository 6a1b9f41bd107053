package tui

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"regexp"
	"strings"
	"time"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/viewport"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"

	"scorewright/contract/risk"
	"scorewright/generator/design"
	"scorewright/internal/safefile"
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
	savedMsg struct {
		path string
		gen  uint64 // the generation that was saved
		err  error
	}
	openedMsg struct {
		path string
		d    *design.Design
		err  error
	}
	exportedMsg struct {
		files []string
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
	comp          *compiled
	compGen       uint64
	debouncedGen  uint64
	checkRun      uint64 // id of the latest check run
	checkGen      uint64 // generation the latest check run is for
	fitGen        uint64

	ctx        context.Context
	cancelAll  context.CancelFunc
	cancelChk  context.CancelFunc
	cancelPic  context.CancelFunc
	cancelFit  context.CancelFunc
	cancelBt   context.CancelFunc
	btRun      uint64 // id of the latest backtest run
	btGen      uint64 // generation the latest backtest run is for
	history    string // the forecast history the backtest replays ("" none)
	showBT     bool   // the backtest view replaces the panes
	bt         BacktestView
	showRisk   bool // the risk view replaces the panes
	risk       RiskView
	riskIn     RiskInputs
	riskSet    bool                  // the user changed the wealth, so it no longer follows the budget
	riskCoefs  map[risk.Kind]float64 // each family's last coefficient
	riskRun    uint64                // id of the latest risk run
	riskGen    uint64                // generation the latest risk run is for
	riskFor    RiskInputs            // inputs the latest risk run is for
	cancelRisk context.CancelFunc
	research   *ResearchRoom // the research view (tui/research.go) replaces the panes when shown
	demoIndex  int
	savedGen   uint64 // generation last opened or saved
	armed      string // a key pressed once that needs a second press
	focus      pane
	lower      pane // which of checks/budget the small layout shows
	designPane DesignPane
	picture    PicturePane
	checks     ChecksPane
	budget     BudgetPane
	dialog     *fileDialog
	help       bool
	helpView   viewport.Model
	status     string
	quitting   bool

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
	}
	if set.Fitter == nil {
		set.Fitter = defaultFitter()
	}
	if set.Exporter == nil {
		set.Exporter = defaultExporter(set.Version)
	}
	keys := DefaultKeyMap()
	ctx, cancel := context.WithCancel(context.Background())
	m := &Model{
		set: set, st: st, keys: keys, d: cloneDesign(d), path: path,
		ctx: ctx, cancelAll: cancel, gen: 1, savedGen: 1, lower: paneChecks,
		designPane: NewDesignPane(st, keys, d),
		picture:    NewPicturePane(st, keys),
		checks:     NewChecksPane(st, keys, set.Checker != nil),
		budget:     NewBudgetPane(st, keys, set.Fitter != nil),
		helpView:   viewport.New(40, 10),
		bt:         NewBacktestView(st, keys),
		risk:       NewRiskView(st, keys),
		riskIn:     defaultRiskInputs(d),
		riskCoefs:  map[risk.Kind]float64{},
		research:   NewResearchRoom(st, keys, d),
	}
	m.helpView.KeyMap = viewport.KeyMap{Up: keys.Up, Down: keys.Down, PageUp: keys.PageUp, PageDown: keys.PageDown}
	m.designPane.Focus()
	m.checks.edited()
	return m
}

// Init starts compiling the design.
func (m *Model) Init() tea.Cmd {
	return tea.Batch(compileCmd(m.gen, cloneDesign(m.d)), m.debounce())
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
func (m *Model) RiskInputs() RiskInputs { return m.riskIn }

// Status is the status line's message.
func (m *Model) Status() string { return m.status }

// Close cancels every background job; call it after the program ends.
func (m *Model) Close() { m.cancelAll() }

func (m *Model) debounce() tea.Cmd {
	gen := m.gen
	return tea.Tick(m.set.debounce(), func(time.Time) tea.Msg { return debounceMsg{gen: gen} })
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
	case compiledMsg:
		if msg.gen != m.gen {
			return m, nil
		}
		m.comp, m.compGen = msg.c, msg.gen
		m.designPane.setCompiled(msg.c)
		if msg.c.ok() {
			m.picture.setDesign(msg.c.d.N(), msg.c.reward(), m.payFunc() != nil, msg.c.onInterval())
		} else {
			m.checks.block("the formula does not compile")
			m.picture.noDesign("nothing to draw until the formula compiles")
		}
		return m, tea.Batch(m.requestPicture(), m.maybeStart())
	case debounceMsg:
		if msg.gen != m.gen {
			return m, nil
		}
		m.debouncedGen = msg.gen
		return m, m.maybeStart()
	case pictureMsg:
		if msg.gen == m.gen {
			m.picture.show(msg)
		}
		return m, nil
	case checkRunMsg:
		if msg.run != m.checkRun {
			return m, nil
		}
		switch inner := msg.msg.(type) {
		case checkProgressMsg:
			m.checks.progressed(inner.done, inner.total)
		case checkDoneMsg:
			if errors.Is(inner.err, context.Canceled) {
				return m, nil
			}
			m.checks.finished(inner.report, inner.err)
		}
		return m, nil
	case fitMsg:
		if msg.gen != m.gen {
			return m, nil
		}
		m.fitGen = msg.gen
		m.budget.setTable(msg.table, msg.err)
		if m.comp.ok() {
			m.picture.setDesign(m.comp.d.N(), m.comp.reward(), m.payFunc() != nil, m.comp.onInterval())
		}
		return m, m.requestPicture()
	case btRunMsg:
		return m, m.backtestMsg(msg)
	case riskRunMsg:
		m.riskMsg(msg)
		return m, nil
	case researchRunMsg:
		m.research.Msg(msg)
		return m, nil
	case savedMsg:
		gen := msg.gen
		return m, m.fileDone(msg.err, func() {
			m.path = msg.path
			m.savedGen = gen
			m.status = "saved the design to " + msg.path
		})
	case openedMsg:
		return m, m.fileDone(msg.err, func() {
			m.status = "opened " + msg.path
			m.path = msg.path
		}, func() tea.Cmd { return m.replaceDesign(msg.d) })
	case exportedMsg:
		return m, m.fileDone(msg.err, func() {
			m.status = "exported: " + strings.Join(msg.files, ", ")
		})
	}
	return m, nil
}

// wanted reports whether the stream carrying msg is still current.
func (m *Model) wanted(msg tea.Msg) bool {
	switch r := msg.(type) {
	case checkRunMsg:
		return r.run == m.checkRun
	case btRunMsg:
		return r.run == m.btRun
	case riskRunMsg:
		return r.run == m.riskRun
	case researchRunMsg:
		return r.run == m.research.run
	}
	return false
}

// fileDone finishes a file dialog: an existing file makes it ask before
// replacing, other errors stay in the dialog, success closes it.
func (m *Model) fileDone(err error, ok func(), then ...func() tea.Cmd) tea.Cmd {
	if m.dialog == nil {
		return nil
	}
	switch {
	case errors.Is(err, safefile.ErrExists):
		m.dialog.askOverwrite()
		return nil
	case err != nil:
		m.dialog.failed("✗ " + strings.ReplaceAll(err.Error(), "\n", "; "))
		return nil
	}
	m.dialog = nil
	ok()
	var cmds []tea.Cmd
	for _, f := range then {
		cmds = append(cmds, f())
	}
	return tea.Batch(cmds...)
}

// key routes a key: ctrl+c first, then open overlays, then a focused text
// input (which sees every printable key), then global shortcuts, then the
// focused pane.
func (m *Model) key(km tea.KeyMsg) tea.Cmd {
	k := m.keys
	if key.Matches(km, k.QuitHard) {
		return m.quit()
	}
	if km.String() != m.armed {
		m.armed = ""
	}
	if m.tooSmall() {
		if key.Matches(km, k.Quit) {
			return m.quit()
		}
		return nil
	}
	if m.help {
		switch {
		case key.Matches(km, k.Help), key.Matches(km, k.Leave), key.Matches(km, k.Quit):
			m.help = false
		default:
			var cmd tea.Cmd
			m.helpView, cmd = m.helpView.Update(km)
			return cmd
		}
		return nil
	}
	if m.dialog != nil {
		d, cmd, act := m.dialog.Update(km)
		m.dialog = &d
		switch act {
		case actCancel:
			m.dialog = nil
			m.status = "cancelled"
		case actSubmit:
			return tea.Batch(cmd, m.submitDialog())
		}
		return cmd
	}
	if m.showBT {
		switch {
		case key.Matches(km, k.Leave), key.Matches(km, k.Backtest):
			m.showBT = false
			return m.requestPicture()
		case key.Matches(km, k.History):
			m.openDialog(dialogHistory)
			return nil
		case key.Matches(km, k.StopRun):
			if m.bt.Running() || m.cancelBt != nil {
				m.stopBacktest()
				m.btRun++ // its late answers are dropped
				m.bt.stop()
				m.status = "backtest stopped"
			}
			return nil
		case key.Matches(km, k.Up), key.Matches(km, k.Down), key.Matches(km, k.PageUp), key.Matches(km, k.PageDown):
			m.bt = m.bt.Update(km)
			return nil
		case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
			m.showBT = false
		}
	}
	if m.research.Shown() {
		handled, cmd := m.research.Key(m.ctx, km, m.d, m.gen, m.researchReady())
		if handled {
			if !m.research.Shown() {
				return tea.Batch(cmd, m.requestPicture())
			}
			return cmd
		}
	}
	if m.showRisk {
		switch {
		case key.Matches(km, k.Leave), key.Matches(km, k.Risk):
			m.showRisk = false
			return m.requestPicture()
		case key.Matches(km, k.Up):
			m.risk.sel = (m.risk.sel + riskFieldCount - 1) % riskFieldCount
			return nil
		case key.Matches(km, k.Down):
			m.risk.sel = (m.risk.sel + 1) % riskFieldCount
			return nil
		case key.Matches(km, k.Less), key.Matches(km, k.More), key.Matches(km, k.LessFine), key.Matches(km, k.MoreFine):
			up := key.Matches(km, k.More) || key.Matches(km, k.MoreFine)
			fine := key.Matches(km, k.LessFine) || key.Matches(km, k.MoreFine)
			if riskStep(&m.riskIn, m.risk.sel, m.d, up, fine, m.riskCoefs) {
				if m.risk.sel == riskWealth {
					m.riskSet = true
				}
				return m.maybeRisk()
			}
			return nil
		case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
			m.showRisk = false
		}
	}
	typing := m.designPane.Typing() || m.budget.Typing()
	switch {
	case km.Type == tea.KeyF1 || (!typing && key.Matches(km, k.Help)):
		m.openHelp()
		return nil
	case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
		step := 1
		if key.Matches(km, k.PrevPane) {
			step = int(paneCount) - 1
		}
		m.setFocus((m.focus + pane(step)) % paneCount)
		m.layout()
		return m.requestPicture()
	case key.Matches(km, k.Save):
		m.openDialog(dialogSave)
		return nil
	case key.Matches(km, k.Open):
		m.openDialog(dialogOpen)
		return nil
	case key.Matches(km, k.Export):
		m.openDialog(dialogExport)
		return nil
	case key.Matches(km, k.Backtest):
		m.showRisk = false
		m.research.Close()
		return m.toggleBacktest()
	case key.Matches(km, k.Risk):
		m.research.Close()
		return m.toggleRisk()
	case key.Matches(km, k.Research):
		m.stopTyping()
		m.showBT, m.showRisk = false, false
		return m.research.Toggle(m.ctx, m.d, m.gen, m.researchReady())
	case !typing && key.Matches(km, k.Demo):
		if !m.confirmDiscard(km, "ctrl+n again discards them") {
			return nil
		}
		m.demoIndex = (m.demoIndex + 1) % len(demos())
		m.path = ""
		cmd := m.replaceDesign(demos()[m.demoIndex]())
		m.status = "demo design: " + m.d.Title
		return cmd
	case !typing && !m.designPane.Picking() && key.Matches(km, k.Quit):
		if !m.confirmDiscard(km, "q again quits without saving") {
			return nil
		}
		return m.quit()
	}
	if m.showBT || m.showRisk || m.research.Shown() {
		return nil
	}
	return m.routeToPane(km)
}

func (m *Model) routeToPane(km tea.KeyMsg) tea.Cmd {
	switch m.focus {
	case paneDesign:
		p, cmd, changed := m.designPane.Update(km, m.d)
		m.designPane = p
		if changed {
			return tea.Batch(cmd, m.edited())
		}
		return cmd
	case panePicture:
		p, changed := m.picture.Update(km)
		m.picture = p
		if changed {
			return m.requestPicture()
		}
	case paneChecks:
		if key.Matches(km, m.keys.Rerun) {
			m.debouncedGen = m.gen
			m.checkGen = 0
			return m.maybeStart()
		}
	case paneBudget:
		p, cmd, changed := m.budget.Update(km, m.d)
		m.budget = p
		if changed {
			return tea.Batch(cmd, m.edited())
		}
		return cmd
	}
	return nil
}

// edited starts a new generation after the design changed: running work
// for the old one is cancelled, the formula is recompiled at once and the
// checks wait out the debounce.
func (m *Model) edited() tea.Cmd {
	m.gen++
	m.stopCheck()
	m.checkRun++ // answers of the run for the old design are now stale
	m.checks.edited()
	m.budget.edited()
	if m.history != "" {
		m.stopBacktest()
		m.btRun++ // answers of the run for the old design are now stale
		m.bt.edited()
	}
	m.stopRisk()
	m.riskRun++ // answers of the run for the old design are now stale
	m.risk.edited()
	m.research.Edited(m.d)
	if !m.riskSet {
		m.riskIn.Wealth = defaultRiskInputs(m.d).Wealth
	}
	if m.riskIn.Belief != nil && len(m.riskIn.Belief) != m.d.N() {
		m.riskIn.Belief = nil
	}
	m.status = ""
	return tea.Batch(compileCmd(m.gen, cloneDesign(m.d)), m.debounce())
}

// replaceDesign swaps in a whole new design (opened or demo).
func (m *Model) replaceDesign(d *design.Design) tea.Cmd {
	m.d = cloneDesign(d)
	m.designPane.reset(m.d)
	// A new design's wealth follows its budget again.
	m.riskSet, m.riskIn.Belief = false, nil
	m.budget.setTable(nil, nil)
	cmd := m.edited()
	m.savedGen = m.gen
	return cmd
}

// Unsaved reports whether the design changed since it was opened or saved.
func (m *Model) Unsaved() bool { return m.gen != m.savedGen }

// confirmDiscard lets a key that would lose unsaved changes act only when
// pressed twice in a row; the first press says so on the status line.
func (m *Model) confirmDiscard(km tea.KeyMsg, again string) bool {
	if !m.Unsaved() || m.armed == km.String() {
		m.armed = ""
		return true
	}
	m.armed = km.String()
	m.status = "the design has unsaved changes (ctrl+s saves); " + again
	return false
}

func (m *Model) stopCheck() {
	if m.cancelChk != nil {
		m.cancelChk()
		m.cancelChk = nil
	}
}

// maybeStart starts the checks and the budget fit once the current
// generation is compiled and its debounce has passed.
func (m *Model) maybeStart() tea.Cmd {
	if m.compGen != m.gen || m.debouncedGen != m.gen {
		return nil
	}
	bt := tea.Batch(m.maybeBacktest(), m.maybeRisk(), m.research.Maybe(m.ctx, m.d, m.gen, m.researchReady()))
	if m.checkGen == m.gen {
		return bt
	}
	if !m.comp.ok() {
		m.checks.block("the formula does not compile")
		return nil
	}
	m.checkGen = m.gen
	var cmds []tea.Cmd
	if m.set.Checker != nil {
		m.stopCheck()
		ctx, cancel := context.WithCancel(m.ctx)
		m.cancelChk = cancel
		m.checkRun++
		m.checks.started()
		cmds = append(cmds, tagRun(m.checkRun, checkCmd(ctx, m.gen, cloneDesign(m.d), m.set, m.set.Checker)))
	}
	if m.set.Fitter != nil && m.fitGen != m.gen {
		if m.cancelFit != nil {
			m.cancelFit()
		}
		ctx, cancel := context.WithCancel(m.ctx)
		m.cancelFit = cancel
		cmds = append(cmds, fitCmd(ctx, m.gen, cloneDesign(m.d), m.set.Fitter))
	}
	return tea.Batch(append(cmds, bt)...)
}

// checkRunMsg stamps a check message with the run that sent it, so that
// answers from a run that was replaced (same design, run again) are
// dropped too.
type checkRunMsg struct {
	run uint64
	msg tea.Msg
}

// tagRun wraps every message of a check stream in a checkRunMsg.
func tagRun(run uint64, cmd tea.Cmd) tea.Cmd {
	return func() tea.Msg { return retag(run, cmd()) }
}

func retag(run uint64, msg tea.Msg) tea.Msg {
	s, ok := msg.(streamMsg)
	if !ok {
		return checkRunMsg{run: run, msg: msg}
	}
	next := s.next
	return streamMsg{msg: checkRunMsg{run: run, msg: s.msg}, next: func() tea.Msg { return retag(run, next()) }}
}

func (m *Model) payFunc() func(float64) float64 {
	if m.budget.table != nil && !m.budget.stale {
		return m.budget.table.Pay
	}
	return nil
}

func (m *Model) requestPicture() tea.Cmd {
	if !m.comp.ok() || m.compGen != m.gen || m.width == 0 {
		return nil
	}
	if m.cancelPic != nil {
		m.cancelPic()
	}
	ctx, cancel := context.WithCancel(m.ctx)
	m.cancelPic = cancel
	return m.picture.request(ctx, m.gen, m.comp, m.payFunc())
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

func (m *Model) openHelp() {
	m.help = true
	m.helpView.Width = max(20, m.width-6)
	m.helpView.Height = max(3, m.height-5)
	m.helpView.SetContent(helpText(m.st, m.keys, m.helpView.Width))
	m.helpView.GotoTop()
}

var slugChars = regexp.MustCompile(`[^a-z0-9]+`)

// defaultName is a file name made from the design's title.
func (m *Model) defaultName(ext string) string {
	if m.path != "" && ext == "toml" {
		return m.path
	}
	base := strings.Trim(slugChars.ReplaceAllString(strings.ToLower(m.d.Title), "-"), "-")
	if base == "" {
		base = "design"
	}
	if m.path != "" {
		base = strings.TrimSuffix(filepath.Base(m.path), filepath.Ext(m.path))
	}
	return filepath.Join(m.set.Dir, base+"."+ext)
}

func (m *Model) openDialog(kind dialogKind) {
	m.designPane.stopEditing()
	switch kind {
	case dialogSave:
		d := newFileDialog(m.st, m.keys, kind, m.defaultName("toml"), []string{"toml"})
		m.dialog = &d
	case dialogOpen:
		dir := m.set.Dir
		if dir != "" && !strings.HasSuffix(dir, string(filepath.Separator)) {
			dir += string(filepath.Separator)
		}
		d := newFileDialog(m.st, m.keys, kind, dir, nil)
		if m.Unsaved() {
			d.msg = "the current design has unsaved changes; opening replaces it"
		}
		m.dialog = &d
	case dialogHistory:
		dir := m.set.Dir
		if m.history != "" {
			dir = m.history
		} else if dir != "" && !strings.HasSuffix(dir, string(filepath.Separator)) {
			dir += string(filepath.Separator)
		}
		d := newFileDialog(m.st, m.keys, kind, dir, nil)
		d.msg = "columns: forecaster, question, outcome, then " + strings.Join(m.d.Labels, ", ")
		m.dialog = &d
	case dialogExport:
		if m.set.Exporter == nil {
			m.status = "export needs the table package, which is not part of this build yet"
			return
		}
		fs := m.set.Exporter.Formats(m.d)
		d := newFileDialog(m.st, m.keys, kind, m.defaultName(fs[0]), fs)
		m.dialog = &d
	}
}

// submitDialog returns the command doing what the dialog asked.
func (m *Model) submitDialog() tea.Cmd {
	dl := m.dialog
	path, overwrite, format, lot := dl.Path(), dl.overwrite, dl.Format(), dl.lottery
	if !filepath.IsAbs(path) && m.set.Dir != "" && !strings.HasPrefix(path, m.set.Dir) {
		path = filepath.Join(m.set.Dir, path)
	}
	d, gen := cloneDesign(m.d), m.gen
	switch dl.kind {
	case dialogSave:
		return func() tea.Msg {
			abs, _ := filepath.Abs(path)
			return savedMsg{path: abs, gen: gen, err: d.Save(path, overwrite)}
		}
	case dialogHistory:
		return m.startBacktest(path)
	case dialogOpen:
		return func() tea.Msg {
			nd, err := design.Load(path)
			if err == nil {
				err = prepareDesign(nd)
			}
			return openedMsg{path: path, d: nd, err: err}
		}
	default:
		ex, ctx := m.set.Exporter, m.ctx
		return func() tea.Msg {
			files, err := ex.Export(ctx, d, ExportRequest{Format: format, Path: path, Overwrite: overwrite, Lottery: lot})
			return exportedMsg{files: files, err: err}
		}
	}
}

// PrepareDesign readies a loaded design for the workbench: a preset named
// without a formula gets its formula. It is what `scorewright open` runs
// after design.Load.
func PrepareDesign(d *design.Design) error { return prepareDesign(d) }

func (m *Model) tooSmall() bool { return m.width < MinWidth || m.height < MinHeight }

// layout gives every pane its size. Below 120×40 the right column stacks
// the picture over whichever of checks and budget was focused last; from
// 120×40 all four panes show.
func (m *Model) layout() {
	if m.tooSmall() {
		return
	}
	m.layoutBacktest()
	bh := m.height - 2
	if m.large() {
		lw := m.width * 45 / 100
		rw := m.width - lw
		top := bh * 60 / 100
		m.designPane.SetSize(lw, top)
		m.budget.SetSize(lw, bh-top)
		m.picture.SetSize(rw, top)
		m.checks.SetSize(rw, bh-top)
		return
	}
	lw := m.width / 2
	rw := m.width - lw
	top := bh * 55 / 100
	if m.focus == paneChecks || m.focus == paneBudget {
		top = bh * 40 / 100 // the focused lower pane gets the room
	}
	m.designPane.SetSize(lw, bh)
	m.picture.SetSize(rw, top)
	m.checks.SetSize(rw, bh-top)
	m.budget.SetSize(rw, bh-top)
}

// stopTyping ends any editing in the panes before a view replaces them.
func (m *Model) stopTyping() {
	m.designPane.stopEditing()
	if m.budget.Typing() {
		m.budget.Blur()
		m.budget.Focus()
	}
}

// toggleBacktest opens the backtest view (asking for a history first when
// none is loaded) or closes it.
func (m *Model) toggleBacktest() tea.Cmd {
	if m.showBT {
		m.showBT = false
		return m.requestPicture()
	}
	m.stopTyping()
	if m.history == "" {
		m.openDialog(dialogHistory)
		return nil
	}
	m.showBT = true
	return nil
}

// startBacktest replays the history at path under the current design,
// cancelling any run before it. The history becomes the loaded one when
// its header fits (btStartedMsg).
func (m *Model) startBacktest(path string) tea.Cmd {
	m.stopBacktest()
	ctx, cancel := context.WithCancel(m.ctx)
	m.cancelBt = cancel
	m.btRun++
	m.btGen = m.gen
	return backtestCmd(ctx, m.btRun, m.gen, cloneDesign(m.d), path)
}

func (m *Model) stopBacktest() {
	if m.cancelBt != nil {
		m.cancelBt()
		m.cancelBt = nil
	}
}

// maybeBacktest reruns the loaded history for a design that compiled and
// waited out its debounce.
func (m *Model) maybeBacktest() tea.Cmd {
	if m.history == "" || m.btGen == m.gen || !m.comp.ok() {
		return nil
	}
	return m.startBacktest(m.history)
}

// backtestMsg takes a message of the current backtest run.
func (m *Model) backtestMsg(msg btRunMsg) tea.Cmd {
	if msg.run != m.btRun {
		return nil
	}
	fromDialog := m.dialog != nil && m.dialog.kind == dialogHistory
	switch inner := msg.msg.(type) {
	case btStartedMsg:
		m.history = inner.path
		m.bt.started(inner.path)
		if fromDialog {
			m.dialog = nil
			m.showBT = true
			m.status = ""
		}
	case btProgressMsg:
		m.bt.progressed(inner.done)
	case btDoneMsg:
		if errors.Is(inner.err, context.Canceled) {
			return nil
		}
		m.cancelBt = nil
		if inner.file && fromDialog {
			m.bt.running = false
			m.dialog.failed("✗ " + strings.ReplaceAll(inner.err.Error(), "\n", "; "))
			return nil
		}
		m.bt.finished(inner.res, inner.err)
	}
	return nil
}

// layoutBacktest sizes the backtest and risk views: the whole body.
func (m *Model) layoutBacktest() {
	m.bt.SetSize(m.width, m.height-2)
	m.risk.SetSize(m.width, m.height-2)
	m.research.SetSize(m.width, m.height-2)
}

// researchReady says the design is compiled and its edits have settled,
// so a research study may start.
func (m *Model) researchReady() bool { return m.compGen == m.gen && m.debouncedGen == m.gen }

func (m *Model) large() bool { return m.width >= 120 && m.height >= 40 }

// View draws the screen.
func (m *Model) View() string {
	if m.quitting {
		return ""
	}
	if m.width == 0 {
		return "starting…"
	}
	if m.tooSmall() {
		msg := fmt.Sprintf("The workbench needs a terminal of at least %d×%d;\nthis one is %d×%d. Enlarge it, or press q to quit.", MinWidth, MinHeight, m.width, m.height)
		return lipgloss.Place(m.width, m.height, lipgloss.Center, lipgloss.Center, msg)
	}
	header := m.headerLine()
	var body string
	if m.research.Shown() {
		body = m.research.View(m.d)
	} else if m.showBT {
		body = m.bt.View()
	} else if m.showRisk {
		body = m.risk.View(m.d, m.riskIn)
	} else if m.large() {
		left := lipgloss.JoinVertical(lipgloss.Left, m.designPane.View(m.d), m.budget.View(m.d))
		right := lipgloss.JoinVertical(lipgloss.Left, m.picture.View(), m.checks.View())
		body = lipgloss.JoinHorizontal(lipgloss.Top, left, right)
	} else {
		lower := m.checks.View()
		if m.lower == paneBudget {
			lower = m.budget.View(m.d)
		}
		right := lipgloss.JoinVertical(lipgloss.Left, m.picture.View(), lower)
		body = lipgloss.JoinHorizontal(lipgloss.Top, m.designPane.View(m.d), right)
	}
	screen := header + "\n" + body + "\n" + m.footerLine()
	switch {
	case m.help:
		box := m.st.Dialog.Render(m.st.Header.Render("Keys — esc or ? to close, ↑/↓ pgup/pgdn to scroll") + "\n" + m.helpView.View())
		screen = lipgloss.Place(m.width, m.height, lipgloss.Center, lipgloss.Center, box)
	case m.dialog != nil:
		box := m.dialog.View(m.width)
		screen = overlay(screen, box, m.width, m.height)
	}
	return block(screen, m.width, m.height)
}

func (m *Model) headerLine() string {
	left := m.st.Header.Render("scorewright")
	where := "demo"
	if m.path != "" {
		where = filepath.Base(m.path)
	}
	what := fmt.Sprintf("%d outcomes", m.d.N())
	if onInterval(m.d) && len(m.d.Interval) == 2 {
		what = fmt.Sprintf("a mean on [%g, %g]", m.d.Interval[0], m.d.Interval[1])
	}
	mid := m.st.Dim.Render(fmt.Sprintf(" · %s · %s · %s", where, what, m.d.Mode))
	var tabs []string
	for p, name := range []string{"design", "picture", "checks", "budget"} {
		if pane(p) == m.focus && !m.showBT && !m.showRisk && !m.research.Shown() {
			tabs = append(tabs, m.st.Selected.Render("["+name+"]"))
		} else {
			tabs = append(tabs, m.st.Dim.Render(" "+name+" "))
		}
	}
	if m.showBT {
		tabs = []string{m.st.Selected.Render("[backtest]"), m.st.Dim.Render(" esc: back to the panes")}
	}
	if m.showRisk {
		tabs = []string{m.st.Selected.Render("[risk]"), m.st.Dim.Render(" esc: back to the panes")}
	}
	if m.research.Shown() {
		tabs = []string{m.st.Selected.Render("[research]"), m.st.Dim.Render(" esc: back to the panes")}
	}
	right := strings.Join(tabs, "")
	gap := m.width - lipgloss.Width(left) - lipgloss.Width(mid) - lipgloss.Width(right)
	return left + mid + strings.Repeat(" ", max(1, gap)) + right
}

// footerLine is the status message, or the keys of the focused pane.
func (m *Model) footerLine() string {
	if m.status != "" {
		return m.st.Dim.Render(m.status)
	}
	k := m.keys
	as := func(b key.Binding, keyText, desc string) key.Binding {
		return key.NewBinding(key.WithKeys(b.Keys()...), key.WithHelp(keyText, desc))
	}
	var keys []key.Binding
	if m.designPane.Typing() || m.budget.Typing() {
		keys = []key.Binding{as(k.Leave, "esc", "stop typing"), as(k.NextPane, "tab", "pane"), as(k.Help, "F1", "keys"), as(k.Save, "ctrl+s", "save"), k.QuitHard}
	} else {
		var pane []key.Binding
		switch {
		case m.research.Shown():
			pane = m.research.KeyHelp()
		case m.showBT:
			pane = m.bt.KeyHelp()
		case m.showRisk:
			pane = m.risk.KeyHelp()
		case m.focus == paneDesign:
			pane = m.designPane.KeyHelp()
		case m.focus == panePicture:
			pane = m.picture.KeyHelp()
		case m.focus == paneChecks:
			pane = m.checks.KeyHelp()
		case m.focus == paneBudget:
			pane = m.budget.KeyHelp()
		}
		keys = []key.Binding{as(k.Help, "?", "keys"), as(k.NextPane, "tab", "pane"), k.Quit}
		for _, b := range pane {
			switch {
			case b.Help() == k.Up.Help() && !m.showRisk && !m.research.Shown():
				keys = append(keys, as(b, "↑/↓", "select"))
			case b.Help() == k.Down.Help():
			default:
				keys = append(keys, b)
			}
		}
		keys = append(keys, as(k.Save, "ctrl+s", "save"), as(k.Export, "ctrl+x", "export"))
	}
	h := help.New()
	h.Width = m.width
	h.Styles.ShortKey, h.Styles.ShortDesc, h.Styles.ShortSeparator, h.Styles.Ellipsis = m.st.Key, m.st.Dim, m.st.Dim, m.st.Dim
	return h.ShortHelpView(keys)
}

// overlay centres box over screen.
func overlay(screen, box string, w, h int) string {
	lines := strings.Split(block(screen, w, h), "\n")
	bl := strings.Split(box, "\n")
	bw := lipgloss.Width(box)
	top := max(0, (h-len(bl))/2)
	left := max(0, (w-bw)/2)
	for i, l := range bl {
		if top+i >= len(lines) {
			break
		}
		row := lines[top+i]
		lines[top+i] = cutLeft(row, left) + l + cutRight(row, left+lipgloss.Width(l), w)
	}
	return strings.Join(lines, "\n")
}

// toggleRisk opens the risk view, starting a run when its result is not
// for the current design and inputs, or closes it.
func (m *Model) toggleRisk() tea.Cmd {
	if m.showRisk {
		m.showRisk = false
		return m.requestPicture()
	}
	m.stopTyping()
	m.showBT, m.showRisk = false, true
	return m.maybeRisk()
}

// maybeRisk starts a risk run when the view is open and its last run is
// not for the current design (compiled and debounced) and inputs.
func (m *Model) maybeRisk() tea.Cmd {
	if !m.showRisk || m.compGen != m.gen || m.debouncedGen != m.gen {
		return nil
	}
	if m.riskGen == m.gen && sameInputs(m.riskFor, m.riskIn) && (m.risk.Running() || m.risk.Result() != nil || m.risk.err != nil) {
		return nil
	}
	m.stopRisk()
	ctx, cancel := context.WithCancel(m.ctx)
	m.cancelRisk = cancel
	m.riskRun++
	m.riskGen, m.riskFor = m.gen, m.riskIn
	m.risk.started()
	return riskCmd(ctx, m.riskRun, cloneDesign(m.d), m.riskIn)
}

func sameInputs(a, b RiskInputs) bool {
	return a.Kind == b.Kind && a.Coef == b.Coef && a.Wealth == b.Wealth && (a.Belief == nil) == (b.Belief == nil) && sameVector(a.Belief, b.Belief)
}

func (m *Model) stopRisk() {
	if m.cancelRisk != nil {
		m.cancelRisk()
		m.cancelRisk = nil
	}
}

// riskMsg takes a message of the current risk run.
func (m *Model) riskMsg(msg riskRunMsg) {
	if msg.run != m.riskRun {
		return
	}
	switch inner := msg.msg.(type) {
	case riskProgressMsg:
		m.risk.progressed(inner.done, inner.total)
	case riskDoneMsg:
		if errors.Is(inner.err, context.Canceled) {
			return
		}
		m.cancelRisk = nil
		m.risk.finished(inner.res, inner.err)
	}
}
