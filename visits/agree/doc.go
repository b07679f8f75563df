// Package agree measures how well two landing tables of the same clip
// agree: flitlog against a careful person scoring by hand, or two people
// against each other. Labs report such agreement before they trust
// automatic scores in a paper.
//
// # Input: landing tables
//
// A landing table is a CSV file with a header row and one row per landing
// of a bee on a flower. Two kinds are read (ReadTable):
//
//   - flitlog's visits.csv: recognised by its columns track_id, flower_id,
//     start_s, end_s, duration_s, start_frame and end_frame. Its other
//     columns are ignored.
//   - a score sheet made by hand, with the columns below, in any order.
//     Names are case-insensitive; spaces and hyphens count as underscores.
//
// Columns of a score sheet (name, then the other names accepted):
//
//	flower_id   required; flower, flower_name
//	start_s     required; start, onset, onset_s, start_time, begin
//	end_s       end_s or duration_s required; end, offset, offset_s,
//	            end_time, stop
//	duration_s  handling time; duration, handling_s, handling_time_s.
//	            With end_s it must equal end_s - start_s within 0.05 s.
//	track_id    optional bee label; bee, bee_id, track
//	clip        optional clip name; clip_id, video, file
//	note        optional free text, ignored; notes, comment, comments,
//	            remark, remarks, observer
//
// For example:
//
//	flower_id,start_s,end_s,bee
//	A1,0:12.4,0:15.0,red dot
//	A2,1:02.8,1:09.1,red dot
//
// Any other column is an error in a score sheet (it is most often a
// misspelt name). Times are seconds from the clip's first frame, written
// as seconds (83.4), minutes and seconds (1:23.4) or hours, minutes and
// seconds (0:01:23.4); see ParseTime. Fields may be separated by commas,
// semicolons or tabs (the header row decides); with semicolons or tabs a
// decimal comma is accepted (1:23,4). Blank lines and lines starting
// with # are skipped. A table must hold at least one landing, end must not
// come before start, and a table's clip column, when present, must name one
// clip, the same as the other table's (compared by file name without
// folder and extension, so clip01.mp4 equals clip01).
//
// Bad input is reported as a *ParseError naming the file, the row (the
// file's line number, counted from 1 as a spreadsheet numbers rows, so the
// header is row 1 unless comment lines precede it) and the field.
//
// # Event agreement
//
// Table A is the reference, B is compared with it; all differences are
// B - A. Two landings may match when they are on the same flower (ids
// compared ignoring case) and overlap in time or are apart by at most a
// tolerance (Options.ToleranceS, default 0.5 s). Bee labels are not used:
// two scorers' labels need not correspond. Among all one-to-one matchings
// the one with the most matched pairs is taken, and among those the one
// with the least total boundary error sum |onset_B - onset_A| +
// |offset_B - offset_A|, found exactly with the Hungarian method (Kuhn
// 1955; Munkres 1957) on each group of landings that could match one
// another. Then
//
//	precision = matched / landings in B
//	recall    = matched / landings in A
//	F1        = 2 matched / (landings in A + landings in B)
//
// and the onset and offset differences of the matched pairs (s) are
// summarised by their median and the 95th percentile of their absolute
// value (Hyndman & Fan 1996, definition 7).
//
// # Handling-time agreement
//
// Over matched landings, with durations d = end - start in seconds:
// Bland-Altman bias and 95 % limits of agreement (Bland & Altman 1986),
// the intraclass correlation ICC(2,1): two-way random effects, absolute
// agreement, single rater (Shrout & Fleiss 1979; ICC(1,1) and ICC(3,1)
// are computed as well), and Lin's concordance correlation coefficient
// (Lin 1989), each with a 95 % confidence interval.
//
// # Frame-wise agreement
//
// The landed / not landed state of each flower is sampled on a time grid
// (Options.GridS, default 0.1 s; 1/fps to sample every frame) at times
// k * GridS over the span from the earliest start to the latest end in
// either table (or Options.FromS to Options.ToS). A flower is landed at
// time t when a landing on it has start <= t < end, the convention of
// visits.Landing. All (flower, time) cells are pooled into one 2 x 2
// table and summarised by the proportion of agreement and Cohen's kappa
// (Cohen 1960). Neighbouring cells are not independent, so no confidence
// interval is given for this kappa.
//
// References:
//
//   - Bland, J. M. & Altman, D. G. (1986). Statistical methods for
//     assessing agreement between two methods of clinical measurement.
//     Lancet 327(8476), 307-310.
//   - Cohen, J. (1960). A coefficient of agreement for nominal scales.
//     Educational and Psychological Measurement 20(1), 37-46.
//   - Hyndman, R. J. & Fan, Y. (1996). Sample quantiles in statistical
//     packages. American Statistician 50(4), 361-365.
//   - Kuhn, H. W. (1955). The Hungarian method for the assignment problem.
//     Naval Research Logistics Quarterly 2, 83-97.
//   - Lin, L. I.-K. (1989). A concordance correlation coefficient to
//     evaluate reproducibility. Biometrics 45(1), 255-268.
//   - Lin, L. I.-K. (2000). A note on the concordance correlation
//     coefficient. Biometrics 56(1), 324-325.
//   - Munkres, J. (1957). Algorithms for the assignment and transportation
//     problems. J. Soc. Indust. Appl. Math. 5(1), 32-38.
//   - Shrout, P. E. & Fleiss, J. L. (1979). Intraclass correlations: uses
//     in assessing rater reliability. Psychological Bulletin 86(2),
//     420-428.
package agree
