// Package visits turns bee tracks into flower visits: landings on the
// flowers of a flower map, inspections of flowers without landing, the
// flights between landings, and foraging summaries per bee and per clip.
// It works on plain Go data (kinematics.Result) and never touches video.
//
// # Flower map
//
// A flower map (FlowerMap, JSON as in DESIGN.md) gives each flower a
// circle in pixels of the video frame (x_px, y_px, r_px) and optionally a
// kind, a nectar reward (reward_ul, microlitres of standing crop) and an
// outline polygon (polygon_px), which then replaces the circle for the
// inside test. ReadFlowerMap and Validate reject bad maps with one-line
// errors that name the line, flower and field and say what to fix. A
// flower partly outside the frame is fine.
//
// # Landings
//
// A bee is landed on a flower when it is on the flower (inside the outline
// grown by MarginMM), still, and slower than LandSpeedMMPerS for at least
// MinLandingS without a break; the landing then goes on while the bee stays
// within ExitMarginMM of the flower and no faster than TakeOffSpeedMMPerS
// (hysteresis, so that handling movements and walking do not end it), and
// landed runs on one flower at most MergeGapS apart are one landing.
//
// "Still" is the test that tells a bee sitting on a flower from one
// hovering over it, which from above is at the same place and about as
// slow: over a window of StillWindowS centred on the frame, the root mean
// square scatter of the measured positions about their mean (per axis)
// must not exceed sqrt((StillNoiseFactor sigma)^2 + StillFloorMM^2), where
// sigma is the tracker's position noise. A hovering bee wanders by a
// millimetre or more at a few hertz; a sitting bee's scatter is the noise.
// sigma is estimated from the clip: for every 5 consecutive track points
// slower than HoverSpeedMMPerS, s^2 = (RSS_x + RSS_y)/4 about least-squares
// quadratics in time is sigma^2 chi^2_4/4 for noise alone, so
// sigma = sqrt(median(s^2) / 0.8392) (0.8392 = median of chi^2_4 / 4);
// smooth motion over 5 frames adds little and the median ignores the hard
// accelerations. Settings.PositionNoisePX overrides the estimate.
//
// Where a bee is on overlapping flowers, the flower whose centre is
// nearest wins when the landing starts; a landed bee that walks onto an
// overlapping flower and sits still there for MinLandingS, nearer its
// centre, ends the first landing and starts one on the second.
//
// Frames are inclusive (see Landing): StartFrame is the first landed
// frame, EndFrame the last, EndS the time of the frame after EndFrame, so
// DurationS = EndS - StartS, the handling time, is a whole number of frame
// periods. The first frame is placed as a change point: going back from
// where the landing was found, samples near the resting place (the median
// position over the next 0.3 s, within sqrt((RestTolSigma sigma)^2 (1 +
// 1/m) + StillFloorMM^2)) count for the landing and farther ones against,
// each by at most one sample's worth, and the start is where the sum is
// largest. The last frame is where the smoothed speed first passes
// TakeOffSpeedMMPerS. Both are accurate to about a frame for approaches and
// take-offs that speed up and slow down over a few frames; a bee that stops
// dead is found to the frame, one that leaves with an instant jump up to two
// frames early (the smoothing of kinematics spreads the jump).
//
// A landing that starts at a track's first point or ends at its last (the
// clip's start or end, or where the tracker lost the bee), or next to a
// gap in the track, is kept and flagged CensoredStart or CensoredEnd: its
// true handling time is longer. It needs only MinCensoredLandingS.
//
// # Inspections
//
// An inspection is a run of at least MinInspectionS of frames, outside any
// landing, in which the bee is within InspectRadiusMM of a flower's
// outline and slower than HoverSpeedMMPerS (the nearest centre decides
// between flowers), and which does not run into or out of a landing on the
// same flower (that is the landing's approach or departure). Inspections
// are never counted as landings. MinDistMM is the closest approach to the
// outline (negative: over the flower).
//
// # Per landing
//
// Approach (departure) speed is the mean speed over ApproachWindowS before
// the first frame (DepartureWindowS after the last), NaN where the track
// does not cover the window. Revisit: the same bee landed on this flower
// before in the clip. SincePrevVisitS: from the end of the previous landing
// on this flower by any bee to the start of this one (negative while two
// bees share the flower). Index: position in the bee's sequence, from 1.
// RewardUL: the flower's reward_ul on its first landing in the clip and 0
// on later ones (the standing crop was taken), or every time with
// Settings.RewardEveryLanding; NaN without rewards.
//
// # Flights between flowers
//
// A Flight joins consecutive landings of one bee: from take-off (the frame
// after the first landing, StartS = its EndS) to the next landing's first
// frame, so DurationS is the inter-visit interval. DistanceMM is the
// straight line from the take-off point to the landing point (the bee's
// positions on the last and first landed frames); FlowerDistanceMM is the
// distance between the two flowers' centres; PathLengthMM sums the steps of
// the track in between; MeanSpeedMMPerS = PathLengthMM / DurationS.
//
// # Summaries
//
// Per bee (one track) and per clip: landings per minute of tracked time
// (per clip: of the clip's duration), distinct flowers landed on, handling
// time of the uncensored landings (mean, median, quartiles, IQR), the
// inter-visit interval (mean, median, ...), the fraction of landings that
// are revisits, inspections per landing, counts of moves between flower
// kinds, Bateman's constancy index for each pair of kinds, and with rewards
// the nectar taken and the intake rates NectarUL / HandlingTotalS (uL per s
// of handling) and NectarUL / ForagingS (uL per s of foraging, from the
// start of a bee's first landing to the end of its last: handling plus
// travel, the rate of optimal foraging theory; Charnov 1976, Stephens &
// Krebs 1986). Percentiles interpolate linearly between order statistics
// (Hyndman & Fan 1996, definition 7).
//
// Bateman's index for kinds A and B, from the numbers of moves A->A, A->B,
// B->A and B->B between consecutive landings, is
//
//	BI = (sqrt(AA BB) - sqrt(AB BA)) / (sqrt(AA BB) + sqrt(AB BA)),
//
// +1 for complete constancy, 0 for switching at random, -1 for strict
// alternation (Bateman 1951; as given by Waser 1986).
//
// # Units
//
// Positions for flower membership are in px (the flower map's frame);
// distances and speeds in mm and mm/s on the flower plane (kinematics'
// XMM, YMM, SpeedMMPerS), converted to px with Clip.PXPerMM where flower
// outlines are concerned; times in s from the clip's first frame; nectar
// in uL.
//
// # Scoring
//
// ScoreAgainstTruth compares found landings and inspections with ground
// truth, matching them by flower and time (not by track id), for the
// synthetic scenes of track/meadow and the demo scorecard.
//
// References:
//
//   - Bateman A.J. (1951) The measurement of specificity in pollinating
//     insects. Heredity 5: 271-278.
//   - Waser N.M. (1986) Flower constancy: definition, cause, and
//     measurement. American Naturalist 127: 593-603.
//   - Charnov E.L. (1976) Optimal foraging, the marginal value theorem.
//     Theoretical Population Biology 9: 129-136.
//   - Stephens D.W., Krebs J.R. (1986) Foraging Theory. Princeton
//     University Press.
//   - Hyndman R.J., Fan Y. (1996) Sample quantiles in statistical
//     packages. American Statistician 50: 361-365.
//   - Yule G.U. (1912) On the methods of measuring association between
//     two attributes. Journal of the Royal Statistical Society 75: 579-652.
//   - Flash T., Hogan N. (1985) The coordination of arm movements: an
//     experimentally confirmed mathematical model. Journal of
//     Neuroscience 5: 1688-1703 (minimum-jerk paths of the test bees).
package visits
