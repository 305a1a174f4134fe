#include "analyzer/color/ciede2000.h"

#include <cmath>

namespace clipwarden::color {
namespace {

constexpr double kDegToRad = M_PI / 180.0;
constexpr double kPow25To7 = 6103515625.0;  // 25^7

// Hue angle in degrees [0, 360) of (a', b'); 0 for a neutral colour
// (Sharma et al. 2005, eq. 4 and the note after it).
double hue_prime_deg(double a_prime, double b) {
  if (a_prime == 0 && b == 0) return 0;
  const double h = std::atan2(b, a_prime) / kDegToRad;
  return h < 0 ? h + 360.0 : h;
}

}  // namespace

double ciede2000(const Lab& lab1, const Lab& lab2, const De2000Weights& w) {
  // Step 1: C'_i and h'_i (eqs. 2-7).
  const double c1 = std::hypot(lab1.a, lab1.b);
  const double c2 = std::hypot(lab2.a, lab2.b);
  const double c_mean = (c1 + c2) / 2.0;
  const double c_mean7 = std::pow(c_mean, 7.0);
  const double g = 0.5 * (1.0 - std::sqrt(c_mean7 / (c_mean7 + kPow25To7)));
  const double a1p = (1.0 + g) * lab1.a;
  const double a2p = (1.0 + g) * lab2.a;
  const double c1p = std::hypot(a1p, lab1.b);
  const double c2p = std::hypot(a2p, lab2.b);
  const double h1p = hue_prime_deg(a1p, lab1.b);
  const double h2p = hue_prime_deg(a2p, lab2.b);

  // Step 2: dL', dC', dH' (eqs. 8-11). dh' is 0 when either chroma is 0 and
  // otherwise the hue difference folded into (-180, 180].
  const double dlp = lab2.l - lab1.l;
  const double dcp = c2p - c1p;
  const double chroma_product = c1p * c2p;
  double dhp = 0;
  if (chroma_product != 0) {
    dhp = h2p - h1p;
    if (dhp > 180.0) {
      dhp -= 360.0;
    } else if (dhp < -180.0) {
      dhp += 360.0;
    }
  }
  const double dHp = 2.0 * std::sqrt(chroma_product) * std::sin(dhp * kDegToRad / 2.0);

  // Step 3: means and weighting functions (eqs. 12-22). The mean hue is the
  // sum when either chroma is 0, and otherwise the mean of the two angles
  // taken along the shorter arc (eq. 14).
  const double lp_mean = (lab1.l + lab2.l) / 2.0;
  const double cp_mean = (c1p + c2p) / 2.0;
  double hp_mean = h1p + h2p;
  if (chroma_product != 0) {
    const double sum = h1p + h2p;
    if (std::abs(h1p - h2p) <= 180.0) {
      hp_mean = sum / 2.0;
    } else if (sum < 360.0) {
      hp_mean = (sum + 360.0) / 2.0;
    } else {
      hp_mean = (sum - 360.0) / 2.0;
    }
  }
  const double t = 1.0 - 0.17 * std::cos((hp_mean - 30.0) * kDegToRad) +
                   0.24 * std::cos(2.0 * hp_mean * kDegToRad) +
                   0.32 * std::cos((3.0 * hp_mean + 6.0) * kDegToRad) -
                   0.20 * std::cos((4.0 * hp_mean - 63.0) * kDegToRad);
  const double d_theta = 30.0 * std::exp(-std::pow((hp_mean - 275.0) / 25.0, 2.0));
  const double cp_mean7 = std::pow(cp_mean, 7.0);
  const double r_c = 2.0 * std::sqrt(cp_mean7 / (cp_mean7 + kPow25To7));
  const double l50 = (lp_mean - 50.0) * (lp_mean - 50.0);
  const double s_l = 1.0 + 0.015 * l50 / std::sqrt(20.0 + l50);
  const double s_c = 1.0 + 0.045 * cp_mean;
  const double s_h = 1.0 + 0.015 * cp_mean * t;
  const double r_t = -std::sin(2.0 * d_theta * kDegToRad) * r_c;

  const double tl = dlp / (w.k_l * s_l);
  const double tc = dcp / (w.k_c * s_c);
  const double th = dHp / (w.k_h * s_h);
  return std::sqrt(tl * tl + tc * tc + th * th + r_t * tc * th);
}

}  // namespace clipwarden::color
