package tui

import (
	"context"
	"errors"

	tea "github.com/charmbracelet/bubbletea"

	"scorewright"
	"scorewright/generator/design"
	"scorewright/internal/pool"
)

// Certifier runs the interval certificate of a design (verify/certify): nil
// with no error when no certificate applies or certificates are off. It
// must return soon after ctx is cancelled and may call progress (the share
// proved, of 1) from any goroutine.
type Certifier func(ctx context.Context, d *design.Design, s Settings, progress pool.Progress) (*CertificateView, error)

// defaultCertifier is the build's certificate, as `check --certify` runs it.
func defaultCertifier() Certifier {
	return func(ctx context.Context, d *design.Design, s Settings, progress pool.Progress) (*CertificateView, error) {
		r, err := scorewright.Open(d)
		if err != nil {
			return nil, err
		}
		return certifyDesign(ctx, r, s, progress), ctx.Err()
	}
}

// The certificate is a job of its own: it starts when the grid check of
// the same generation has ended, so the grid's verdict shows at once, and
// its messages carry its run so an edit (which drops the job) leaves its
// late answers unread.
type (
	certRunMsg struct {
		run uint64
		msg tea.Msg
	}
	certProgressMsg struct{ done, total float64 }
	certDoneMsg     struct {
		cert *CertificateView
		err  error
	}
)

// certCmd runs certifier on d (a private copy) for run.
func certCmd(ctx context.Context, run uint64, d *design.Design, s Settings, certifier Certifier) tea.Cmd {
	tag := func(m tea.Msg) tea.Msg { return certRunMsg{run: run, msg: m} }
	return runStream(ctx, func(send func(tea.Msg, bool)) {
		cert, err := certifier(ctx, d, s, func(p pool.Step) {
			send(tag(certProgressMsg{done: p.Done, total: p.Total}), false)
		})
		send(tag(certDoneMsg{cert: cert, err: err}), true)
	})
}

// startCertificate begins the certificate of the current design once its
// grid check has given a report.
func (m *Model) startCertificate() tea.Cmd {
	if m.set.Certifier == nil || m.checks.report == nil || m.checkJob.gen != m.gen {
		return nil
	}
	ctx, run := m.certJob.start(m.ctx, m.gen)
	m.checks.certifying()
	return certCmd(ctx, run, cloneDesign(m.d), m.set, m.set.Certifier)
}

// certMsg takes a message of the certificate job; stale ones are dropped.
func (m *Model) certMsg(msg certRunMsg) {
	if !m.certJob.current(msg.run) || m.certJob.gen != m.gen {
		return
	}
	switch inner := msg.msg.(type) {
	case certProgressMsg:
		m.checks.certDone, m.checks.certTotal = inner.done, inner.total
	case certDoneMsg:
		if errors.Is(inner.err, context.Canceled) {
			return
		}
		m.certJob.finished()
		m.checks.certified(inner.cert)
	}
}
