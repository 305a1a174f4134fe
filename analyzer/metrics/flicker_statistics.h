// Clip-level flicker statistics of a brightness series, after the IES
// Lighting Handbook's measures of light-source flicker (percent flicker and
// flicker index), plus the dominant flicker frequency. Pure functions over
// per-frame values; NaN marks an undefined frame and is skipped.
//
// Percent flicker = 100 (max - min) / (max + min)  (IES; also called
//   modulation depth, in percent).
// Flicker index = (area of the waveform above its mean) / (total area under
//   the waveform), over a cycle (IES). Over a sampled series of whole cycles
//   the areas are sums of samples (rectangle rule).
//
// Closed forms for L(t) = L0 (1 + m sin(2 pi f t)), 0 <= m <= 1, used by the
// tests:
//   max = L0 (1 + m), min = L0 (1 - m), so
//   percent flicker = 100 (2 m L0) / (2 L0) = 100 m.
//   The mean is L0; over one period T the part above it is L0 m sin(.) on the
//   first half-period, of area L0 m * integral_0^{T/2} sin(2 pi t / T) dt =
//   L0 m T / pi; the total area is L0 T. So flicker index = m / pi.
// For a 50% square wave between a and b (a < b): mean (a+b)/2, area above
// it (b-a)/2 * T/2, total (a+b)/2 * T, so flicker index = (b-a) / (2 (a+b))
// = percent flicker / 200.
#pragma once

#include <limits>
#include <span>

namespace clipwarden {

double percent_flicker(std::span<const double> values);
double flicker_index(std::span<const double> values);

struct DominantFrequency {
  double frequency_hz = 0;  // NaN when the series is too short or flat
  // Share of the spectrum's power (DC excluded) within one bin of the peak:
  // near 1 for a clean periodic flicker, small for broadband noise.
  double power_share = 0;
};

// The strongest frequency of a (high-passed) series sampled at times_s, in
// Hz. Samples are put on a uniform grid at the median frame interval by
// linear interpolation (so variable frame rates and dropped frames keep
// real time), Hann-windowed, zero-padded and transformed with cv::dft; the
// peak is refined by parabolic interpolation. Frequencies up to the Nyquist
// limit fps/2 are representable.
DominantFrequency dominant_frequency(std::span<const double> values,
                                     std::span<const double> times_s);

// All of the above for a clip's brightness track (e.g. the motion-
// compensated mean relative luminance). Slow change is removed first: the
// track minus its centred running median over `median_window_s` is the
// fast part, which drives the dominant frequency; percent flicker and
// flicker index are taken of the fast part re-centred on the track's mean
// level, so a fade or a pan from shade to sun is not counted as flicker.
// Frames within half a median window of either end, where the window is
// one-sided, are left out (unless that would leave nothing). Over a whole
// clip the extremes are the 2nd and 98th percentiles (a sinusoid's are
// 0.996 of its swing) and values are clipped to them and to >= 0, so one
// frame far off (a missed cut, the edge of a fade) cannot dominate.
struct FlickerStatistics {
  double percent_flicker = 0;
  double flicker_index = 0;
  DominantFrequency dominant;
};
// `level`: the clip's mean brightness to re-centre on; NaN takes the mean of
// the track (pass the plain mean luminance when the track is a running sum
// of changes whose absolute level may drift).
FlickerStatistics flicker_statistics(std::span<const double> track,
                                     std::span<const double> times_s,
                                     double median_window_s = 1.0,
                                     double level = std::numeric_limits<double>::quiet_NaN());

}  // namespace clipwarden
