// Package meadow renders synthetic video of bees foraging on flowers, seen
// from above, together with its exact ground truth, so that segmentation,
// tracking, kinematics and visit detection can be measured in numbers.
//
// A scene is planned from a Config and its Seed (New): the flower layout,
// every bee's path over the whole clip, and the truth (bee positions per
// frame, landings, inspections, close passes). Planning is cheap; frames
// are rendered on demand (Scene.Render) and can be encoded with WriteClip.
// The same Config renders the same frames and truth, in any frame order.
//
// # Coordinates and units
//
// Image positions are in px with pixel centres at integer coordinates
// (OpenCV's convention): pixel (col, row) covers [col-0.5, col+0.5) x
// [row-0.5, row+0.5). The flower plane is seen square-on with a uniform
// scale Config.PXPerMM (default WidthPX/600: a 600 mm wide view, 2.13 px/mm
// at 1280 px). Times are s from frame 0: frame i is at i/FPS. Headings are
// atan2(dy, dx) of image steps in degrees, in (-180, 180] (clockwise on
// screen, as in package kinematics). Speeds are given in mm/s and
// converted with PXPerMM.
//
// # Scene model
//
// Ground: a flat colour, or (TextureContrast > 0) blotches of soil and moss
// at two scales, pixel grain and a litter of short grass strokes, slightly
// blurred. It is drawn once per scene.
//
// Vegetation (Vegetation > 0): grass blades (tapered, curved polygons 25-70
// mm long, 2-4 mm wide) and a quarter as many trifoliate clover leaves,
// drawn every frame. Each blade tip moves by WindSwayPX times a wind drive
// (a sine of period WindPeriodS with a harmonic, modulated by gusts of
// period 4.3 WindPeriodS); the displacement grows with the square of the
// distance from the base.
//
// Flowers: Flowers heads of radius FlowerRadiusMinMM..FlowerRadiusMaxMM
// (petal tips), placed at random at least 1.5 body lengths plus their
// radius from the frame edge and two body lengths apart. Kinds (KindNames):
// white clover (white, 18 florets in two rings), dandelion (yellow, 26 ray
// florets in two rings), borage (purple-blue, 5 pointed petals, dark cone)
// and red campion (pink, 5 broad petals). Heads sway by FlowerSwayPX with
// the wind; a bee landed on a flower moves with it. The flower map
// (Truth.Flowers) holds the rest positions.
//
// Bees: a dark, soft-edged ellipse (length BeeLengthMM, default 14 mm, a
// bumblebee worker, width half the length; edge width max(1.2 px, 7 % of
// the length)) drawn with analytic anti-aliased coverage at sub-pixel
// position, oriented along the heading. BeeBanding adds two yellow bands
// at ±0.2 body lengths; BeeWings adds a translucent wing blur (two
// ellipses 0.6 x 0.3 body lengths beside the body) to airborne bees, its
// opacity flickering from frame to frame (0.15-0.40); ExposureS smears the
// body along its motion over the distance travelled during the exposure
// (1/250 s in the presets: about 4 px at 500 mm/s and 2.13 px/mm);
// BeeShadow adds a soft shadow down-right of the bee, 0.12 body lengths
// away and 30 % dark when landed, up to 1.2 body lengths away and 14 %
// dark when flying. Bands, wings and motion blur are symmetric about the
// body centre, so the darkness-weighted centroid of the bee (frame without
// bees minus frame) is its truth point: measured error below 0.04 px with
// every one of them on, and with camera shake. The shadow moves that
// centroid (by up to 5 px for a flying bee when the whole shadow is
// counted) and is therefore off in that measurement; a segmentation that
// thresholds darkness keeps the bee and drops most of the shadow.
//
// Behaviour: each bee enters from beyond a frame edge at a time in
// [0, EntryMaxS] and repeatedly chooses a flower (nearer flowers likelier;
// a flower it landed on before with probability RevisitProb) and approaches
// it. A flight follows a cubic Bézier curve with random sideways bend, with
// a speed profile rising from the start speed to a cruise speed drawn from
// CruiseSpeedMinMMPerS..CruiseSpeedMaxMMPerS and falling to zero, each
// change a half-cosine with mean acceleration AccelMMPerS2, plus a
// sideways zigzag of ZigzagMM at 3-5 Hz scaled by speed. At the flower the
// bee hovers (wandering by 0.8-2 mm at 1.5-3.5 Hz) and either leaves after
// 0.6-2 s without landing (an inspection, with probability
// InspectionProb, or when another bee occupies the flower), or hovers
// 0.25-0.7 s, settles onto the flower within 0.3-0.45 s and handles it for
// a log-normal time (median HandlingMedianS, log-sd HandlingSigma, clipped
// to [1 s, HandlingMaxS]). While handling it rests 0.8-4 s at a time,
// turns slowly, and walks 2-6 mm at WalkSpeedMMPerS within half the flower
// radius. After a landing it leaves the frame with probability ExitProb,
// stays outside OutsideMinS..OutsideMaxS and re-enters at another edge.
// The body turns towards the direction of travel at up to 1200 deg/s.
//
// States in the truth: flying during flights, hovering while hovering and
// settling, landed while handling. A landing's frames are those with the
// bee landed; an inspection's frames are its hover. Requirements
// (MinLongLandingS, MinInspections, MinRevisits, MinExits) are met by
// scripting bee 0's first actions; MinCrossings by re-planning the bees
// with new random streams until enough close passes of airborne bees
// occur. New fails if they cannot be met.
//
// Occluder (Occluder): a leaf (6 x 2.2 body lengths) held above the
// flowers across the middle of one of bee 0's flights; bees pass behind it.
// TruthPoint.Visible is false while the body with its soft edge lies wholly
// under the leaf (wing blur and shadow may still show beside it).
//
// Camera and sensor, applied in this order after drawing:
//   - ShakePX: camera shake, a translation of the whole image by two sines
//     (1.1-4.3 Hz) plus per-frame jitter, bilinear; truth points move with
//     the image.
//   - IlluminationDrift: brightness gain 1 + a(0.65 sin(2 pi t/T1) + 0.35
//     sin(2 pi t/T2)) with T1 in 20-40 s and T2 in 7-12 s (passing
//     clouds).
//   - FlickerDepth: gain 1 + d sin(2 pi 2 MainsHz t) sampled at the frame
//     times, so the 100 Hz flicker of 50 Hz mains appears at 10 Hz in 30
//     fps video, 20 Hz at 120 fps and not at all at 25 fps.
//   - NoiseSigma: Gaussian sensor noise (grey levels), from a precomputed
//     tile read at a random offset per frame.
//
// Encoding: WriteClip writes H.264 ("avc1") into .mp4 and .mkv and motion
// JPEG into .avi through OpenCV's FFmpeg backend, whose H.264 encoder adds
// the compression artefacts of real field footage.
//
// Presets (Preset): "single", "three", "windy", "highspeed" and "demo"; the
// demo shows two bumblebees working white clover and borage in bed 4 of
// the Quince Row allotments, a place invented for it.
//
// References:
//   - P. J. Acklam (2003), an algorithm for computing the inverse normal
//     cumulative distribution function (rational approximation used for
//     the noise table).
//   - Bézier curves and smoothstep easing: common practice in computer
//     graphics.
//   - Handling times of bumblebees on flowers last seconds to tens of
//     seconds and are right-skewed, hence log-normal here (from memory;
//     the defaults are invented, not fitted).
package meadow
