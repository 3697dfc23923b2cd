// Unit conversions against CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)),
// values as tabulated in shared physics notes section 9 and the CODATA 2018 tables.
import { describe, expect, it } from "vitest";
import { CODATA_2018, MEV_PER_CM, MEV_PER_GHZ, MEV_PER_K, MU_B_MEV_PER_T, unitInfo } from "./units";

describe("CODATA 2018 constants", () => {
  it("has the exact SI defining constants", () => {
    expect(CODATA_2018.elementaryCharge).toBe(1.602176634e-19);
    expect(CODATA_2018.boltzmann).toBe(1.380649e-23);
    expect(CODATA_2018.planck).toBe(6.62607015e-34);
    expect(CODATA_2018.speedOfLight).toBe(299792458);
  });

  it("muB/h = 13.996 244 936 1 GHz/T (CODATA 2018)", () => {
    expect(MU_B_MEV_PER_T / MEV_PER_GHZ).toBeCloseTo(13.9962449361, 9);
  });

  it("muB/kB = 0.671 713 815 63 K/T (CODATA 2018)", () => {
    expect(MU_B_MEV_PER_T / MEV_PER_K).toBeCloseTo(0.67171381563, 10);
  });

  it("muB = 5.788 381 8060e-5 eV/T (CODATA 2018)", () => {
    expect(MU_B_MEV_PER_T * 1e-3).toBeCloseTo(5.7883818060e-5, 14);
  });

  it("muB/(hc) = 0.466 864 478 cm^-1/T (CODATA 2018)", () => {
    expect(MU_B_MEV_PER_T / MEV_PER_CM).toBeCloseTo(0.466864478, 8);
  });

  it("1 meV = 241.799 GHz = 11.6045 K = 8.06554 cm^-1 (CODATA 2018)", () => {
    expect(1 / MEV_PER_GHZ).toBeCloseTo(241.799, 3);
    expect(1 / MEV_PER_K).toBeCloseTo(11.6045, 4);
    expect(1 / MEV_PER_CM).toBeCloseTo(8.06554, 5);
  });

  it("g = 2 at 1 T is 27.99 GHz and 0.1158 meV (CODATA 2018)", () => {
    expect(2 * MU_B_MEV_PER_T).toBeCloseTo(0.11577, 5);
    expect((2 * MU_B_MEV_PER_T) / MEV_PER_GHZ).toBeCloseTo(27.9925, 4);
  });

  it("field units: 1 G = 1e-4 T, 1 mT = 1e-3 T (SI definitions)", () => {
    expect(unitInfo("G")?.toCanonical).toBe(1e-4);
    expect(unitInfo("mT")?.toCanonical).toBe(1e-3);
  });
});
