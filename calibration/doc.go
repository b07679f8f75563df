// Package calibration turns image pixels into millimetres on the flower
// plane and frame numbers into seconds.
//
// # Pixels to millimetres
//
// Three methods, which can be combined (lens model first, then scale or
// plane):
//
//   - Scale (ScaleFromPoints): the two ends of a reference of known length
//     lying on the flower plane give px/mm = distance px / length mm. A
//     click error of 1 px at each end can change the distance by up to
//     2 px, so the scale is uncertain by 2 px / length mm (relative:
//     2 px / distance px); a 200 px reference gives 1%. The plane axes are
//     the image axes (x right, y down), origin at the top-left pixel. Use
//     it when the camera looks straight down at a flat patch.
//   - Plane (FitPlane): four or more points whose positions on the plane
//     are known in mm (tape-measured pegs, tile corners) give a homography
//     from pixels to plane mm, for a camera that looks at the patch at an
//     angle (Hartley & Zisserman 2004, ch. 4). It is fitted with OpenCV's
//     findHomography by RANSAC with a 3 px threshold, from plane to image
//     so that the reported reprojection errors are in pixels; points RANSAC
//     rejects are reported as likely click or measuring mistakes. Four
//     points fit exactly (error 0); six or more show the click error.
//   - Lens model (CalibrateChessboard): photos of a printed chessboard
//     taken with the same camera setting give the camera matrix and five
//     distortion coefficients of OpenCV's model (Zhang 2000; Brown 1966),
//     fitted with OpenCV's findChessboardCorners, cornerSubPix and
//     calibrateCamera; the RMS reprojection error of the corners is
//     reported (below 0.5 px is a good calibration). Pixels are then
//     undistorted before the scale or homography applies. Undistortion
//     of single points is done in Go (Camera.Undistort: OpenCV's
//     undistortPoints iteration, run to convergence), so that mapping a
//     track costs no OpenCV call per point.
//
// Calibration.ToPlaneMM applies the chain; Calibration.NominalPXPerMM
// gives the local scale at the frame centre for turning mm settings into
// pixel gates. A calibration is valid only for the frame size it was made
// for (CheckFrameSize): zoom, resolution or camera height changes need a
// new one.
//
// # Calibration file
//
// A JSON object; unknown keys are an error (so a typo is not ignored).
//
//	{
//	  "format": "flitlog-calibration",   required
//	  "version": 1,                      required
//	  "frame_width_px": 1920,            frame size the calibration is for;
//	  "frame_height_px": 1080,           required with a homography
//	  "px_per_mm": 3.712,                plain scale, px per mm, or ...
//	  "px_per_mm_uncertainty": 0.011,    from a 1 px click at each end
//	  "reference_length_mm": 500,        how the scale was measured
//	  "reference_px": [x1, y1, x2, y2],
//	  "homography_px_to_mm": [9 numbers],  ... plane homography, row-major,
//	                                     undistorted px -> mm
//	  "plane_points": [{"x_px": 0, "y_px": 0, "x_mm": 0, "y_mm": 0}, ...],
//	  "plane_rms_px": 0.42,              RMS reprojection error, px
//	  "camera": {                        optional lens model
//	    "fx_px": 536.1, "fy_px": 536.1, "cx_px": 342.4, "cy_px": 235.5,
//	    "k1": -0.27, "k2": -0.04, "k3": 0.25, "p1": 0.0018, "p2": -0.0003,
//	    "rms_reprojection_px": 0.39, "views": 13
//	  },
//	  "note": "free text"
//	}
//
// Exactly one of px_per_mm and homography_px_to_mm must be present for
// Load; a file with only a camera (from 'flitlog calibrate chessboard'
// without plane points) is read by LoadLens to be combined with a scale
// or plane later.
//
// # Frames to seconds
//
// TimeBase holds the one rule that turns frame numbers into seconds: an
// fps override if given, else the container's timestamps if they are
// finite and strictly increasing, else the nominal frame rate. Time 0 is
// the clip's first frame.
//
// References:
//
//   - Zhang Z (2000) A flexible new technique for camera calibration. IEEE
//     Transactions on Pattern Analysis and Machine Intelligence
//     22:1330-1334.
//   - Brown DC (1966) Decentering distortion of lenses. Photogrammetric
//     Engineering 32:444-462.
//   - Hartley R, Zisserman A (2004) Multiple View Geometry in Computer
//     Vision, 2nd ed. Cambridge University Press (ch. 4: homography
//     estimation, RANSAC).
//   - Fischler MA, Bolles RC (1981) Random sample consensus. Communications
//     of the ACM 24:381-395.
//   - OpenCV 4.6 documentation, calib3d module: findChessboardCorners,
//     cornerSubPix, calibrateCamera, undistortPoints, findHomography.
package calibration
