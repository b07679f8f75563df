// Package flowerfind proposes a flower map from a background image.
package flowerfind
