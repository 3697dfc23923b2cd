// Tests of the two-branch formulas (branches.ts): the Larmor limit at q = 0, the large-q limit,
// the leading-order splitting and the DM doublet. Physics layer tests; energies in units of J.
import { describe, expect, it } from "vitest";
import { branchCurve, dmDoublet, fieldTheorySplitting, twoBranches } from "./branches";
import { xxzMagnetization, xxzVelocity } from "./bethe";

describe("twoBranches", () => {
  it("q = 0: lower line at h with all the weight 2m, upper at h + Delta with none (Larmor, physics-notes 4, 6)", () => {
    const point = twoBranches(0.3, Math.PI / 2, 0.05, 0, 0.04);
    expect(point.lower.energy).toBeCloseTo(0.3, 15);
    expect(point.upper.energy).toBeCloseTo(0.35, 15);
    expect(point.lower.weight ?? NaN).toBeCloseTo(0.08, 15);
    expect(point.upper.weight ?? NaN).toBeCloseTo(0, 15);
    expect(point.s).toBe(1);
    expect(point.smallMomentum).toBe(true);
    // v q > h: the lower line would be negative, outside the small-q description.
    expect(twoBranches(0.3, Math.PI / 2, 0.05, 0.5).smallMomentum).toBe(false);
  });

  it("q = 0 with Delta < 0 (J2 beyond the critical point): the line at h still carries 2m", () => {
    // Derivable from the formula with signed s: s = -1, the upper branch sits at h.
    const point = twoBranches(0.3, 1.2, -0.05, 0, 0.04);
    expect(point.upper.energy).toBeCloseTo(0.3, 15);
    expect(point.upper.weight ?? NaN).toBeCloseTo(0.08, 15);
    expect(point.lower.energy).toBeCloseTo(0.25, 15);
    expect(point.lower.weight ?? NaN).toBeCloseTo(0, 15);
  });

  it("weights always sum to 2m and energies straddle h + Delta/2 symmetrically (derivable)", () => {
    for (const q of [0.001, 0.05, 0.3, 1]) {
      const point = twoBranches(0.5, 1.3, 0.08, q, 0.06);
      expect((point.lower.weight ?? 0) + (point.upper.weight ?? 0)).toBeCloseTo(0.12, 15);
      expect((point.lower.energy + point.upper.energy) / 2).toBeCloseTo(0.54, 14);
      expect(point.upper.energy - point.lower.energy).toBeCloseTo(2 * Math.hypot(1.3 * q, 0.04), 14);
    }
  });

  it("v q >> Delta: h + Delta/2 -+ v q (up to Delta^2/(8 v q)) with equal weights m (derivable)", () => {
    const h = 0.4;
    const v = 1.5;
    const splitting = 0.01;
    const q = 2;
    const point = twoBranches(h, v, splitting, q, 0.05);
    const correction = (splitting * splitting) / (8 * v * q);
    expect(point.lower.energy).toBeCloseTo(h + splitting / 2 - v * q - correction, 9);
    expect(point.upper.energy).toBeCloseTo(h + splitting / 2 + v * q + correction, 9);
    expect(Math.abs((point.lower.weight ?? 0) - 0.05)).toBeLessThan(0.05 * (splitting / (2 * v * q)) * 1.01);
    expect(Math.abs((point.upper.weight ?? 0) - 0.05)).toBeLessThan(0.05 * (splitting / (2 * v * q)) * 1.01);
  });

  it("Delta = 0: the free lines h -+ v q with equal weights (physics-notes 6, g neglected)", () => {
    const point = twoBranches(0.7, 1.1, 0, 0.2, 0.1);
    expect(point.lower.energy).toBeCloseTo(0.7 - 0.22, 15);
    expect(point.upper.energy).toBeCloseTo(0.7 + 0.22, 15);
    expect(point.lower.weight ?? NaN).toBeCloseTo(0.1, 15);
    expect(point.upper.weight ?? NaN).toBeCloseTo(0.1, 15);
  });

  it("without m only the weight fractions are given", () => {
    const point = twoBranches(0.3, 1, 0.1, 0.05);
    expect(point.lower.weight).toBeNull();
    expect(point.lower.weightFraction + point.upper.weightFraction).toBeCloseTo(1, 15);
  });

  it("branchCurve samples the same formula", () => {
    const grid = [0, 0.1, 0.2];
    const curve = branchCurve(0.3, 1.4, 0.05, 0.03, grid);
    grid.forEach((q, i) => {
      const point = twoBranches(0.3, 1.4, 0.05, q, 0.03);
      expect(curve.lowerEnergy[i]).toBe(point.lower.energy);
      expect(curve.upperEnergy[i]).toBe(point.upper.energy);
      expect(curve.lowerWeight[i]).toBe(point.lower.weight);
      expect(curve.upperWeight[i]).toBe(point.upper.weight);
    });
  });
});

describe("fieldTheorySplitting", () => {
  it("Delta = 2 (2 pi v m - h) and g = 2 (1 - h/(2 pi v m)) (physics-notes 6)", () => {
    const estimate = fieldTheorySplitting(0.1, Math.PI / 2, 0.0112);
    expect(estimate.splitting).toBeCloseTo(2 * (Math.PI * Math.PI * 0.0112 - 0.1), 14);
    expect(estimate.g).toBeCloseTo(2 * (1 - 0.1 / (Math.PI * Math.PI * 0.0112)), 14);
    expect(estimate.valid).toBe(true);
  });

  it("Heisenberg chain with the Bethe m(h): positive, small g at small field, flagged beyond m = 0.05", () => {
    // chi(h) > 1/pi^2 (bethe.test.ts, Griffiths 1964) means 2 pi v m > h with v = pi/2, so the
    // estimate is positive; at h = 0.1 (m ~ 0.011) g is of order 1/ln(1/h) (physics-notes 6).
    const v = xxzVelocity(1);
    const small = fieldTheorySplitting(0.1, v, xxzMagnetization(1, 0.1).m);
    expect(small.splitting).toBeGreaterThan(0);
    expect(small.g).toBeGreaterThan(0);
    expect(small.g).toBeLessThan(0.5);
    expect(small.valid).toBe(true);
    const large = fieldTheorySplitting(1, v, xxzMagnetization(1, 1).m);
    expect(large.valid).toBe(false);
  });

  it("refuses m = 0", () => {
    expect(fieldTheorySplitting(0.1, 1, 0).valid).toBe(false);
  });
});

describe("dmDoublet", () => {
  it("Delta = 0: the doublet is h -+ v theta with equal weights (physics-notes 4)", () => {
    const J = 1;
    const D = 0.08;
    const v = 1.3;
    const doublet = dmDoublet(0.5, v, 0, D, J, 0.05);
    const theta = Math.atan(D / J);
    expect(doublet.theta).toBeCloseTo(theta, 15);
    expect(doublet.lower.energy).toBeCloseTo(0.5 - v * theta, 15);
    expect(doublet.upper.energy).toBeCloseTo(0.5 + v * theta, 15);
    expect(doublet.lower.weight ?? NaN).toBeCloseTo(0.05, 15);
    expect(doublet.upper.weight ?? NaN).toBeCloseTo(0.05, 15);
    expect(doublet.naiveApplies).toBe(true);
  });

  it("Heisenberg v = pi J/2, small D: reduces to h -+ (pi/2) D up to O(D^3) (derivable: atan D = D - D^3/3)", () => {
    const D = 0.01;
    const doublet = dmDoublet(0.4, Math.PI / 2, 0, D, 1);
    const bound = (Math.PI / 2) * (D ** 3 / 3) * 1.01;
    expect(Math.abs(doublet.lower.energy - doublet.naive.lower)).toBeLessThan(bound);
    expect(Math.abs(doublet.upper.energy - doublet.naive.upper)).toBeLessThan(bound);
    expect(doublet.naive.upper).toBeCloseTo(0.4 + (Math.PI / 2) * D, 15);
  });

  it("splitting comparable to v theta: asymmetric doublet, naive form flagged as not applicable", () => {
    // physics-notes 4: at moderate fields in the Heisenberg chain Delta is not small against v theta.
    const doublet = dmDoublet(0.5, Math.PI / 2, 0.1, 0.05, 1, 0.06);
    expect(doublet.naiveApplies).toBe(false);
    expect(doublet.splittingRatio).toBeGreaterThan(1);
    const midpoint = (doublet.lower.energy + doublet.upper.energy) / 2;
    expect(midpoint).toBeCloseTo(0.55, 14); // shifted by Delta/2 from h
    expect(doublet.lower.weight ?? 0).toBeGreaterThan(doublet.upper.weight ?? 0);
  });
});
