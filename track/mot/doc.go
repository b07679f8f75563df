// Package mot scores tracks against ground truth with the CLEAR MOT
// metrics and the identity metrics IDF1, IDP and IDR, for checking the
// tracker on synthetic scenes with known bee paths.
//
// # Input
//
// Both sets are lists of observations (Obs): frame, object ID and
// position in px. A truth position and a hypothesis position in the same
// frame can correspond only if their Euclidean distance is at most the
// threshold T (maxDistPX); a sensible T is about one bee body length.
//
// # CLEAR MOT (Bernardin & Stiefelhagen 2008)
//
// Frame by frame, correspondences of the previous frame that are still
// within T are kept; the other objects and hypotheses are matched by a
// minimum-total-distance assignment with as many pairs as possible (the
// Hungarian method, link.Assign). A truth object newly matched to another
// hypothesis than its latest earlier match counts an ID switch (mismatch).
// With g_t truth objects, m_t misses, fp_t false positives, mme_t
// mismatches and c_t matches of distance d_{i,t} in frame t,
//
//	MOTA = 1 - sum_t (m_t + fp_t + mme_t) / sum_t g_t       (Eq. 3)
//	MOTP = sum_{i,t} d_{i,t} / sum_t c_t                    (Eq. 1), px
//
// MOTP is reported as the mean distance in px (lower is better), and
// RMSEPX = sqrt(sum d^2 / sum c) beside it. Fragmentations count the
// times a truth trajectory is interrupted (matched, then missed while
// present, then matched again); mostly tracked / mostly lost objects are
// matched in >= 80 % / <= 20 % of their frames (Li, Huang & Nevatia 2009).
//
// # Identity metrics (Ristani et al. 2016)
//
// Truth trajectories and hypothesis trajectories are matched one to one,
// globally, so as to maximise IDTP, the number of frames in which the
// paired trajectories are both present and within T (solved with
// link.Assign). Then IDFN = (truth observations) - IDTP,
// IDFP = (hypothesis observations) - IDTP and
//
//	IDP  = IDTP / (IDTP + IDFP)
//	IDR  = IDTP / (IDTP + IDFN)
//	IDF1 = 2 IDTP / (2 IDTP + IDFP + IDFN)
//
// # False tracks
//
// A hypothesis track is false if less than half of its observations are
// matched by the CLEAR MOT matching (FalseTracks for other fractions);
// PerMinute turns a count into a rate for a clip.
//
// References:
//
//   - Bernardin K, Stiefelhagen R (2008) Evaluating multiple object
//     tracking performance: the CLEAR MOT metrics. EURASIP Journal on Image
//     and Video Processing 2008:246309.
//   - Li Y, Huang C, Nevatia R (2009) Learning to associate: HybridBoosted
//     multi-target tracker for crowded scene. CVPR 2009, 2953-2960.
//   - Ristani E, Solera F, Zou R, Cucchiara R, Tomasi C (2016) Performance
//     measures and a data set for multi-target, multi-camera tracking.
//     ECCV 2016 Workshops, LNCS 9914, 17-35.
package mot
