// Package report turns a screening run into what inspectors and rating engineers read: a
// static HTML site (WriteSite) and a terminal explanation of one member (Explain).
//
// The site is an index page (the ranked priority list, flag counts, the run's configuration
// and the cautions) and one page per flagged bridge: an elevation of the truss with every
// member drawn by its proposed rating factor (flagged members with a proposed RF labelled,
// the labels placed clear of each other and of the joint names, or numbered in a key below
// the drawing where a crowded joint leaves no room), and for each flagged member its influence line
// with the governing train standing where it causes the extreme, and the rating arithmetic
// C, D, L, 1 + I and RF under the existing and the proposed traffic. Pages carry their styles
// and their one small sorting script inline, load nothing, and open from disk.
//
// The report draws from the types of model.go, which the store fills from a run's results.
// Geometry and influence lines are rebuilt from the stored truss parameters, or the stored
// joint table (screening.Geometry and analysis.InfluenceLines are cheap and exact), so the
// drawing is of the truss as screened.
//
// Placement convention (package envelope): a train running left to right has its front at
// HeadM and its axles at HeadM − a, a being an axle's distance behind the front; a train
// running right to left has them at HeadM + a. Forces are kN per analysed main truss, tension
// positive; live-load forces carry the truss share and not the dynamic allowance, which is
// shown beside them as 1 + I.
//
// Every text from the inventory passes through html/template's contextual escaping; the
// package builds no markup by string concatenation. Where inventory text stands on its own
// (IDs, names, lines, member labels, trains, reasons) it sits in a <bdi> element, so that a
// name in a right-to-left script does not reorder the text around it; and every
// bidirectional override, embedding or isolate character in a page is written as a visible
// escape such as ‹U+202E› (package safetext), so that none can reorder what follows it. The
// drawings' SVG text is the rebuilt geometry's (joint names, member labels) and numbers. The
// terminal explanation writes inventory text through safetext.Terminal. Input arguments are
// never modified.
//
// Screening is not a load rating: every page and every explanation carries that caution.
package report
