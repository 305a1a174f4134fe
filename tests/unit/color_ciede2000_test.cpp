// CIEDE2000 against the 34 test pairs of G. Sharma, W. Wu, E. N. Dalal,
// "The CIEDE2000 color-difference formula: implementation notes,
// supplementary test data, and mathematical observations", Color Res. Appl.
// 30(1):21-30, 2005, Table 1 (copied with its citation line into
// tests/data/color/ciede2000_sharma2005.tsv). The paper's tolerance: 1e-4.
#include <gtest/gtest.h>

#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "analyzer/color/ciede2000.h"

namespace {

using clipwarden::color::ciede2000;
using clipwarden::color::Lab;

struct TestPair {
  int id = 0;
  Lab lab1, lab2;
  double expected = 0;
};

std::vector<TestPair> read_sharma_table() {
  std::ifstream in(std::string(CLIPWARDEN_SOURCE_DIR) + "/tests/data/color/ciede2000_sharma2005.tsv");
  std::vector<TestPair> pairs;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#' || line.rfind("pair", 0) == 0) continue;
    std::istringstream fields(line);
    TestPair p;
    fields >> p.id >> p.lab1.l >> p.lab1.a >> p.lab1.b >> p.lab2.l >> p.lab2.a >> p.lab2.b >>
        p.expected;
    if (fields) pairs.push_back(p);
  }
  return pairs;
}

TEST(Ciede2000, Sharma2005Table1AllPairsBothOrders) {
  const auto pairs = read_sharma_table();
  ASSERT_EQ(pairs.size(), 34u) << "the table must hold all 34 pairs of Sharma et al. (2005)";
  for (const auto& p : pairs) {
    EXPECT_NEAR(ciede2000(p.lab1, p.lab2), p.expected, 1e-4) << "pair " << p.id;
    EXPECT_NEAR(ciede2000(p.lab2, p.lab1), p.expected, 1e-4) << "pair " << p.id << " swapped";
  }
}

// Sharma et al. (2005), section "Mathematical observations": the formula is
// zero on identical colours and a mean-hue discontinuity of 180 degrees makes
// pairs 9-12 and 13-15 step in the fourth significant digit, which the table
// above already pins. Here: identity and a neutral pair (hue undefined).
TEST(Ciede2000, IdentityAndNeutralColours) {
  EXPECT_DOUBLE_EQ(ciede2000({50, 10, -20}, {50, 10, -20}), 0.0);
  // For neutral colours only lightness differs; with L' mean 50, S_L = 1,
  // so the difference equals |dL| (eqs. 16-19 of the paper).
  EXPECT_NEAR(ciede2000({45, 0, 0}, {55, 0, 0}), 10.0, 1e-12);
}

}  // namespace
