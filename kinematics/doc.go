// Package kinematics turns a calibrated bee track (positions in mm on the
// flower plane, times in s) into per-point kinematics, flight states and
// per-bout path metrics. It is pure Go (with gonum) and does not use
// OpenCV, so it can be tested on ground-truth tracks without video.
//
// # Quantities and units
//
// Per point (Sample), in the plane coordinates the calibration gives:
//
//   - SmoothXMM, SmoothYMM: Savitzky-Golay smoothed position, mm.
//   - VXMMPerS, VYMMPerS: velocity, mm/s; SpeedMMPerS = |v|, mm/s.
//   - AccelMMPerS2 = |a|, mm/s^2.
//   - HeadingDeg = atan2(vy, vx) in degrees, (-180, 180].
//   - TurnRateDegPerS = (vx ay - vy ax) / |v|^2, the time derivative of
//     the heading, deg/s (positive towards +y from +x).
//   - CurvaturePerMM = |vx ay - vy ax| / |v|^3, 1/mm: 1/r on a circle of
//     radius r mm.
//
// Heading, turning rate and curvature are NaN below
// Settings.HeadingMinSpeedMMPerS. Axes: with a plain px/mm scale the plane
// axes are the image axes, x right and y down, so a positive heading or
// turning rate appears clockwise on screen; with a plane homography they
// are the axes the user gave the plane points in.
//
// # Smoothing and derivatives
//
// Positions are smoothed and differentiated by Savitzky-Golay filtering
// (Savitzky & Golay 1964, with the corrections of Steinier, Termonia &
// Deltour 1972): a polynomial of degree Settings.PolyOrder is fitted by
// least squares to a window of frames around each point, and the smoothed
// position, velocity and acceleration are the fitted polynomial's value
// and derivatives there. The window is given in seconds
// (Settings.SmoothWindowS, default 0.2 s) or frames. The default
// (quadratic, 0.2 s) halves the power of motion at about 5 Hz (-3 dB at
// 0.32 of the Nyquist frequency for 7 frames at 30 fps, 0.17 for 13 frames
// at 60 fps, computed from the weights; see TestSavitzkyGolayCutoff): it
// removes most centroid jitter and keeps the path between blossoms, but
// blunts the fastest turns, so peak turning rates are underestimated. A
// shorter window or a higher degree keeps more of them and more noise.
// The derivatives are taken per frame and converted to time derivatives
// with the chain rule through the frame times: with x1, x2 the first and
// second derivatives of a coordinate per frame and t1, t2 those of the
// frame time, v = x1/t1 and a = (x2 t1 - x1 t2)/t1^3, so variable frame
// rates are handled.
//
// Gaps: no window spans a gap. A gap is (a) a jump of more than one frame
// between consecutive points, or (b) a run of unobserved points
// (Observed = false: coasted or gap-filled by the tracker) lasting longer
// than Settings.MaxUnobservedS (default 0.25 s). Shorter unobserved runs
// are smoothed through: the tracker's interpolation there is better than
// a break. Points in a long unobserved run keep their (interpolated)
// positions, get NaN derivatives, are marked Sample.Gap and belong to no
// bout; for the flight state they take the mean speed across the run, from
// the last point before it to the first point after it, so that a bee
// hidden inside a blossom for a second still reads as landed.
//
// Track ends: a point closer than half a window to the end of a gap-free
// run uses the window of that end, with the polynomial evaluated off
// centre (the end polynomial of Gorry 1990); the smoothing there is
// weaker and the noise larger than in the interior. A run shorter than the
// window is fitted as a whole, with the degree lowered to (points - 1) if
// needed; a one-point run has no derivatives and a two-point run no
// acceleration.
//
// # Flight states
//
// A video from above does not see height. Flight states are therefore
// defined by speed on the plane, with hysteresis (two thresholds each,
// enter and exit) and minimum durations (see segmentStates in states.go):
//
//   - Landed: nearly still for a while: speed below LandedEnterMMPerS
//     (8 mm/s) and staying at or below LandedExitMMPerS (15 mm/s) for at
//     least MinLandedS (0.3 s); airborne blips shorter than MinAirborneS
//     (0.1 s) inside a landing are absorbed. 8 mm/s is about three times
//     the speed noise that 1 px of centroid jitter leaves after smoothing at
//     2 px/mm and 30 fps, and a feeding bee's body moves less than that.
//     Trade-off: a bee walking faster than about 15 mm/s over a blossom
//     is not "landed" here but hovering, and a bee holding still in the
//     air for 0.3 s (rare, but bumblebees do it) is "landed".
//   - Hovering: airborne and slower than HoverEnterMMPerS (50 mm/s),
//     staying at or below HoverExitMMPerS (70 mm/s), for at least
//     MinHoverS (0.1 s): inspection and approach flight in front of a
//     blossom is a few cm/s, flight between blossoms in a patch is some
//     hundreds of mm/s (both from memory, common practice for bees).
//   - Flying: everything else.
//
// The defaults suit bees filmed at 1-4 px/mm and 25-60 fps; at a coarser
// scale the speed noise grows in proportion and LandedEnterMMPerS should
// grow with it.
//
// # Flight bouts and path metrics
//
// A flight bout is a maximal run of airborne (flying or hovering) points
// between landings, track ends and gaps. Its metrics use the smoothed
// positions (raw positions would add the jitter to the path length):
//
//   - PathLengthMM: sum of step lengths; NetDisplacementMM: start to end.
//   - StraightnessIndex = net displacement / path length, 1 for a straight
//     path (Batschelet 1981).
//   - Sinuosity (Benhamou 2004, eq. 8)
//     S = 2 [p ((1+c)/(1-c) + b^2)]^(-1/2), mm^-1/2, with p the mean step
//     length, c the mean cosine of the turning angles and b the coefficient
//     of variation of the step length, computed on the path rediscretised
//     to steps of Settings.SinuosityStepMM (5 mm) as Benhamou recommends
//     (then b = 0). It is NaN for bouts shorter than three steps.
//   - Speed mean, median and 95th percentile (Hyndman & Fan 1996,
//     definition 7), mm/s; time flying and hovering, s.
//
// References:
//
//   - Savitzky A, Golay MJE (1964) Smoothing and differentiation of data by
//     simplified least squares procedures. Analytical Chemistry 36:1627-1639.
//   - Steinier J, Termonia Y, Deltour J (1972) Comments on smoothing and
//     differentiation of data by simplified least square procedure.
//     Analytical Chemistry 44:1906-1909.
//   - Gorry PA (1990) General least-squares smoothing and differentiation
//     by the convolution (Savitzky-Golay) method. Analytical Chemistry
//     62:570-573.
//   - Batschelet E (1981) Circular Statistics in Biology. Academic Press.
//   - Benhamou S (2004) How to reliably estimate the tortuosity of an
//     animal's path: straightness, sinuosity, or fractal dimension?
//     Journal of Theoretical Biology 229:209-220.
//   - Bovet P, Benhamou S (1988) Spatial analysis of animals' movements
//     using a correlated random walk model. Journal of Theoretical Biology
//     131:419-433.
//   - Kareiva PM, Shigesada N (1983) Analyzing insect movement as a
//     correlated random walk. Oecologia 56:234-238.
//   - Hyndman RJ, Fan Y (1996) Sample quantiles in statistical packages.
//     The American Statistician 50:361-365.
package kinematics
