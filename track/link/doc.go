// Package link turns per-frame detections of bees into tracks: one path
// per bee, in pixels of the video frame, with one point per frame except
// while the bee is out of the picture (the frame numbers then jump; see
// Track).
//
// It is pure Go on gonum and needs no OpenCV, so that linking can be
// tested on synthetic detections. Package track (segmentation) calls a
// Linker frame by frame and uses its predictions; package track/mot scores
// the result against ground truth.
//
// # Quantities and units
//
// Positions are px in the full frame (x right, y down), velocities px/s,
// accelerations px/s^2, covariances px^2, times s or frames as the names
// say. Settings lists every tuning field with its unit and default;
// DefaultSettings scales the px defaults by the bee's body length in px
// (BL below).
//
// # Motion model
//
// Each track has a constant-velocity Kalman filter (Kalman) with state
// x = [x y vx vy]', transition F = [I T I; 0 I] for a frame interval T,
// measurement z = H x + v with H = [I 0], R = sigma_v^2 I, and process
// noise Q from a white-noise acceleration model: by default the discrete
// (piecewise-constant) one, Q = sigma_a^2 G G' per axis with
// G = [T^2/2, T]' (Bar-Shalom et al. 2001, Sec. 6.3.3), optionally the
// continuous one. The equations are
//
//	predict:  x = F x,            P = F P F' + Q
//	innovate: nu = z - H x,       S = H P H' + R
//	gain:     K = P H' S^-1
//	update:   x = x + K nu,       P = (I - K H) P (I - K H)' + K R K'
//
// with the covariance update in Joseph form for numerical robustness. For
// the discrete model the steady-state gains equal those of the alpha-beta
// filter of Kalata (1984) for the tracking index Lambda = sigma_a T^2 /
// sigma_v; the tests check this.
//
// A confirmed track that is detected frame after frame runs two such
// models in an interacting multiple model (IMM) filter (Blom &
// Bar-Shalom 1988): "fly", the constant-velocity filter above, and
// "hover", in which the bee stays where it is (position noise
// HoverSigmaPX per frame, no velocity). The bee switches between them as
// a Markov chain with mean sojourn ModeSwitchS; a switch from hover to fly
// starts with velocity N(0, TakeoffSpeedPXPerS^2 I), the prior that
// supplies the state the hover model lacks (mixing of unequal states,
// Granstrom et al. 2015). The filter's combined estimate is the track's
// state. A hovering bee's track thus expects its bee within a few px,
// while a bee taking off beside it may leave fast: the hovering track
// keeps the detection that stayed. While a track coasts or is merged the
// single filter runs, and the IMM restarts at its next detection.
//
// # Association
//
// A detection z may go to a track only inside its gate: the squared
// Mahalanobis distance d^2 = nu' S^-1 nu must not exceed the chi-square
// quantile with 2 degrees of freedom at GateProbability (0.99: 9.21),
// widened to at least MinGateRadiusPX and cut at MaxGateRadiusPX. Among
// gated pairs the assignment of each frame maximises the number of pairs
// and then minimises the total cost d^2 + ln det S (the negative
// log-likelihood of the detection up to a constant; Blackman & Popoli
// 1999; for an IMM track -2 ln of the mixture likelihood
// sum_j c_j N(z; z_j, S_j), and d^2 in the gate the smallest over the
// models), solved by the Hungarian method (Assign; Kuhn 1955, Munkres
// 1957) in a matching cascade (Wojke et al. 2017): first for the
// confirmed tracks detected lately, then for lost confirmed tracks (see
// ReconfirmAfterMisses), then for tentative tracks, each with the
// detections left. A detection left after the first round that lies in
// the gate of a track of that round which took another detection is a
// piece split off that bee's blob (a second bee so close would have
// merged with it): it goes to no later round and starts no track, so a
// lost track cannot latch onto the bee beside the bee's own track. Every
// other detection left at the end starts a tentative track.
//
// # Track life
//
//   - A tentative track is confirmed after MinHitsToConfirm detections and
//     dropped after more than MaxTentativeMisses frames in a row without.
//   - A confirmed track without a detection coasts: a moving one on its
//     prediction with the velocity decaying (half-life CoastVelHalfLifeS),
//     a still one (recent speed <= StillSpeedPXPerS: a landed bee) held
//     where it was last seen with StillSigmaPX of uncertainty (Kalman.Hold).
//     It ends after MaxCoastMovingS or MaxCoastStillS without a reliable
//     detection, or at once when it coasts out of BoundsPX.
//   - A track that coasted more than ReconfirmAfterMisses frames is lost:
//     detections then count only once MinHitsToConfirm have come in a
//     row, so that a coasting track does not live on stray clutter.
//   - Two moving confirmed tracks that come within MergeRadiusPX while one
//     of them loses its detection to the other are merged: both predict
//     through the shared blob from a line fitted to their last detections,
//     without using its centroid. After MaxMergeS the weaker is ended as a
//     duplicate.
//
// # Gap closing
//
// Finish first cuts every track where it coasted for more than
// MaxCoastMovingS without a detection (a still track may coast for
// MaxCoastStillS and then pick up another object: a bee arriving beside a
// fragment on swaying grass), leaving the coasted stretch out. It then
// joins track fragments whose end and start fit one bee: by one
// optimal assignment over all fragment ends and starts in the block form
// of Jaqaman et al. (2008), with the link costs and rules of gapLinkCost
// (plausible speed, gap at most MaxGapS; long gaps only at the frame
// border, nearby after a flight, or for a bee that sat unseen). Gaps
// inside the picture are filled by linear interpolation; points not
// detected have Observed = false. A gap in which the bee left the picture
// (its track was predicted out of the frame, or both ends lie at the
// border more than MaxCoastMovingS apart) joins the identities but gets no
// points: the track's frame numbers jump there. Tracks whose detections
// make up less than MinDetectedFrac of their points are dropped (an M-of-N
// deletion rule over the whole track; Blackman & Popoli 1999). Finally
// fragments with fewer than MinObservedPoints detections, and stationary
// tracks that appear and vanish in mid-clip, are dropped, and the tracks
// are numbered 1..n by first frame.
//
// References:
//
//   - Bar-Shalom Y, Li X R, Kirubarajan T (2001) Estimation with
//     Applications to Tracking and Navigation. Wiley. (CV models Sec. 6.2-6.3,
//     Joseph form Sec. 5.2.3, NIS test Sec. 5.4.2, alpha-beta Sec. 6.5,
//     IMM filter Sec. 11.6.)
//   - Blom H A P, Bar-Shalom Y (1988) The interacting multiple model
//     algorithm for systems with Markovian switching coefficients. IEEE
//     Transactions on Automatic Control 33(8):780-783.
//   - Blackman S, Popoli R (1999) Design and Analysis of Modern Tracking
//     Systems. Artech House. (Gating and assignment costs, Ch. 6.)
//   - Bucy R S, Joseph P D (1968) Filtering for Stochastic Processes with
//     Applications to Guidance. Interscience.
//   - Burkard R, Dell'Amico M, Martello S (2009) Assignment Problems. SIAM.
//   - Granstrom K, Willett P, Bar-Shalom Y (2015) Systematic approach to
//     IMM mixing for unequal dimension states. IEEE Transactions on
//     Aerospace and Electronic Systems 51(4).
//   - Jaqaman K, Loerke D, Mettlen M, et al. (2008) Robust single-particle
//     tracking in live-cell time-lapse sequences. Nature Methods 5:695-702.
//   - Jonker R, Volgenant A (1987) A shortest augmenting path algorithm for
//     dense and sparse linear assignment problems. Computing 38:325-340.
//   - Kalata P R (1984) The tracking index: a generalized parameter for
//     alpha-beta and alpha-beta-gamma target trackers. IEEE Transactions
//     on Aerospace and Electronic Systems 20(2):174-182.
//   - Kalman R E (1960) A new approach to linear filtering and prediction
//     problems. Journal of Basic Engineering 82:35-45.
//   - Kuhn H W (1955) The Hungarian method for the assignment problem.
//     Naval Research Logistics Quarterly 2:83-97.
//   - Munkres J (1957) Algorithms for the assignment and transportation
//     problems. Journal of the SIAM 5:32-38.
//   - Wojke N, Bewley A, Paulus D (2017) Simple online and realtime
//     tracking with a deep association metric. IEEE International
//     Conference on Image Processing, 3645-3649. (Matching cascade.)
package link
