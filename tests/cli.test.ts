// The built command line (dist/cli.js, made by `npm test` before vitest runs): exit codes,
// output formats and messages, run as a user would.
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";

const root = join(__dirname, "..");
const cli = join(root, "dist", "cli.js");

function run(...args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: "utf8" });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

/** Writes a model text to a fresh temporary directory; returns the file's path. */
function modelFile(name: string, text: string): string {
  const file = join(mkdtempSync(join(tmpdir(), "spw-")), name);
  writeFileSync(file, text);
  return file;
}

beforeAll(() => {
  if (!existsSync(cli)) spawnSync(process.execPath, [join(root, "scripts", "build.mjs")], { cwd: root });
});

describe("spinwright CLI", () => {
  it("check exits 0 on the valid samples and 1 on the file with mistakes", () => {
    expect(run("check", "samples/heisenberg-chain-field.spw").code).toBe(0);
    const bad = run("check", "samples/broken/mistakes.spw");
    expect(bad.code).toBe(1);
    expect(bad.out).toMatch(/^samples\/broken\/mistakes\.spw:9:18: error spw-name-unknown: Unknown name 'J3'/m);
  });

  it("report runs on every sample, and prints vectors, tilted fields and diagonal g-tensors in full", () => {
    for (const sample of ["dm-chain", "heisenberg-chain-field", "j1j2-chain-critical", "spin1-chain-anisotropy", "triangular-j1j2", "xxz-chain"]) {
      const r = run("report", `samples/${sample}.spw`);
      expect(r.err, sample).toBe("");
      expect(r.code, sample).toBe(0);
    }
    // Numbers listed with Array.map once got the list index as their digit count.
    const file = modelFile("tilted.spw", 'model "tilted" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain sites Cu\n  let J = 1 meV\n  let n = (0.123456, 2.5, 3)\n  let B = 3 T\n  let A = [[1, 0, 0], [0, 1, 0], [0, 0, 2]] * 1 meV\n  exchange heisenberg(J) on shell 1\n  g Cu = (2.05, 2.1, 2.25)\n  field 1 T along (1, 0, 1)\n}\n');
    const r = run("report", file);
    expect(r.err).toBe("");
    expect(r.code).toBe(0);
    expect(r.out).toContain("g = (2.05, 2.1, 2.25)");
    expect(r.out).toContain("along (0.70711, 0, 0.70711)");
    expect(r.out).toContain("n = (0.12346, 2.5, 3)\n");
    expect(r.out).toContain("B = 3 T\n");
    expect(r.out).toContain("A = [[1, 0, 0], [0, 1, 0], [0, 0, 2]] meV\n");
  });

  it("report names each breaking term by its line and its consequence sentence, once", () => {
    const r = run("report", "samples/dm-chain.spw");
    expect(r.out).toContain("\n  line 13: A DM vector breaks SU(2): the q = 0 resonance is no longer pinned at the Zeeman energy; here D is parallel to the field");
    expect(r.out).not.toContain("breaks SU(2): a Dzyaloshinskii-Moriya term");
  });

  it("report lists each bond as written, with a matrix term's isotropic part named as such", () => {
    const file = modelFile("reversed.spw", 'model "reversed" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain sites V\n  exchange heisenberg(1 meV) on V -> V + (1)\n  exchange dm(-0.1 meV, (0, 0, 1)) on V -> V + (-1)\n  exchange matrix([[0 meV, -0.1 meV, 0 meV], [0.1 meV, 0 meV, 0 meV], [0 meV, 0 meV, 0 meV]]) on V -> V + (1)\n}\n');
    const r = run("report", file);
    expect(r.code).toBe(0);
    expect(r.out).toContain("  dm = -0.1 meV on V -> V + (-1)\n");
    expect(r.out).toContain("  matrix with J = tr/3 = 0 meV on V -> V + (1)\n");
    // dm(-D) on the reversed bond is dm(D) forward; the matrix is dm(-D) forward (D_z = (m_xy - m_yx)/2): they cancel (derivable).
    expect(r.out).toContain("symmetry (without the field): SU(2)");
  });

  it("check exits 2 with a one-line reason for a missing file or a bad option", () => {
    const missing = run("check", "no-such-file.spw");
    expect(missing.code).toBe(2);
    expect(missing.err.trim()).toBe("spinwright: cannot read no-such-file.spw: no such file");
    expect(run("check", "--frobnicate", "x.spw").code).toBe(2);
    expect(run("bogus").code).toBe(2);
  });

  it("--format json gives zero-based LSP ranges", () => {
    const r = run("check", "--format", "json", "samples/broken/mistakes.spw");
    const items = JSON.parse(r.out) as { range: { start: { line: number; character: number } }; code: string }[];
    const unknown = items.find((d) => d.code === "spw-name-unknown");
    expect(unknown?.range.start).toEqual({ line: 8, character: 17 });
  });

  it("--format sarif writes SARIF 2.1.0 with rules and one-based regions", () => {
    const r = run("check", "--format", "sarif", "samples/broken/mistakes.spw");
    const sarif = JSON.parse(r.out);
    expect(sarif.version).toBe("2.1.0");
    const result = sarif.runs[0].results.find((x: { ruleId: string }) => x.ruleId === "spw-name-unknown");
    expect(result.locations[0].physicalLocation.region.startLine).toBe(9);
    expect(result.locations[0].physicalLocation.region.startColumn).toBe(18);
    expect(sarif.runs[0].tool.driver.rules.some((x: { id: string }) => x.id === "spw-name-unknown")).toBe(true);
  });

  it("export writes the cluster JSON; the site and bond counts match the cluster", () => {
    const r = run("export", "samples/j1j2-chain-critical.spw", "--cluster", "10");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.cluster.siteCount).toBe(10);
    expect(j.bonds.length).toBe(20);
    expect(j.units.energy).toBe("meV");
  });

  it("export refuses a file with errors and says why", () => {
    const r = run("export", "samples/broken/mistakes.spw");
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/has errors; fix them before exporting/);
  });

  it("analyze --format json carries symmetry, couplings, frustration, region and resonance", () => {
    const r = run("analyze", "samples/j1j2-chain-critical.spw");
    const j = JSON.parse(r.out);
    expect(j.symmetry.h0).toBe("su2");
    expect(j.couplings.map((c: { character: string }) => c.character)).toEqual(["antiferro", "antiferro"]);
    expect(j.region.family).toBe("j1j2-chain");
    expect(j.resonance.protected).toBe(true);
  });

  it("diff exits 1 when a DM term is added and 0 for a rename", () => {
    const dir = mkdtempSync(join(tmpdir(), "spw-"));
    const base = readFileSync(join(root, "samples", "heisenberg-chain-field.spw"), "utf8");
    writeFileSync(join(dir, "dm.spw"), base.replace("expect su2", "exchange dm(0.1 * J1, (0, 0, 1)) on Cu -> Cu + (1)\n  expect su2"));
    writeFileSync(join(dir, "renamed.spw"), base.replace(/J1/g, "Jx"));
    const flipped = run("diff", "samples/heisenberg-chain-field.spw", join(dir, "dm.spw"), "--format", "markdown");
    expect(flipped.code).toBe(1);
    expect(flipped.out).toMatch(/protected -> not protected/);
    const same = run("diff", "samples/heisenberg-chain-field.spw", join(dir, "renamed.spw"));
    expect(same.code).toBe(0);
    expect(same.out).toMatch(/no physical change/);
  });
});

describe("spinwright solve and --exact", () => {
  it("solve --format json reports the Larmor line of an SU(2) chain as a single pole at the Zeeman energy", () => {
    const r = run("solve", "samples/j1j2-chain-critical.spw", "--sites", "12", "--format", "json");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.sites).toBe(12);
    expect(j.larmor.singlePole).toBe(true);
    // The Zeeman energy of the file (g = 2.1 at 12 T, CODATA 2018 muB) is where the line sits.
    const analyzed = JSON.parse(run("analyze", "samples/j1j2-chain-critical.spw").out);
    expect(Math.abs(j.larmor.zeemanMeV - analyzed.resonance.zeemanMeV) / analyzed.resonance.zeemanMeV).toBeLessThan(1e-9);
    for (const c of j.correlators) expect(Math.abs(c.sumRule.total - c.sumRule.expected)).toBeLessThan(1e-8);
    expect(typeof j.splittingMeV.fromCurrent).toBe("number");
  });

  it("a ferromagnetic chain with uniform DM along the field claims no doublet, and the exact solve finds one q = 0 line at the Zeeman energy", () => {
    // Rotating site j by j theta about D (tan theta = D/J) maps the q = 0 mode to the magnon at
    // q = theta of an XXZ chain (derivable); above the polarized ferromagnet that magnon sits at
    // h + |J| - sqrt(J^2 + D^2) cos theta = h, so the line stays single, unlike the AF chain's doublet.
    const file = modelFile("ferro-dm.spw", 'model "ferro-dm" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain sites Cu\n  exchange heisenberg(-1 meV) on shell 1\n  exchange dm(0.1 meV, (0, 0, 1)) on shell 1\n  g Cu = 2\n  field 2 T along (0, 0, 1)\n  cluster 8 periodic\n}\n');
    const analyzed = JSON.parse(run("analyze", file).out);
    expect(analyzed.resonance.protected).toBe(false);
    expect(analyzed.resonance.dmDoublet).toBeNull();
    expect(run("report", file).out).not.toMatch(/doublet, tan/);
    const j = JSON.parse(run("solve", file, "--sites", "8", "--format", "json").out);
    expect(j.larmor.singlePole).toBe(true);
    expect(Math.abs(j.larmor.offsetFromZeemanMeV)).toBeLessThan(1e-9);
  });

  it("solve of the DM chain finds more than one line at q = 0", () => {
    const j = JSON.parse(run("solve", "samples/dm-chain.spw", "--sites", "12", "--format", "json").out);
    expect(j.larmor.singlePole).toBe(false);
  });

  it("analyze --exact turns the J1-J2 chain's missing numbers into exact-ring values with their method", () => {
    const plain = JSON.parse(run("analyze", "samples/j1j2-chain-critical.spw").out);
    expect(plain.predictions.magnetization.m).toBeNull();
    const exact = JSON.parse(run("analyze", "samples/j1j2-chain-critical.spw", "--exact", "--sites", "12").out);
    expect(exact.predictions.magnetization.method).toMatch(/12-site ring/);
    expect(exact.predictions.branches.valid).toBe(true);
    expect(exact.predictions.branches.method).toMatch(/12-site ring/);
  });

  it("solve refuses a size that is not a whole number of cells and says why", () => {
    const r = run("solve", "samples/j1j2-chain-critical.spw", "--sites", "x");
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--sites takes a whole number/);
  });
});

describe("spinwright diff as a git diff driver", () => {
  it("takes git's seven arguments (path old hex mode new hex mode) and exits 0 so git goes on", () => {
    const dir = mkdtempSync(join(tmpdir(), "spw-git-"));
    const base = readFileSync(join(root, "samples", "heisenberg-chain-field.spw"), "utf8");
    writeFileSync(join(dir, "new.spw"), base.replace("expect su2", "exchange dm(0.1 * J1, (0, 0, 1)) on Cu -> Cu + (1)\n  expect su2"));
    const r = run("diff", "samples/m.spw", "samples/heisenberg-chain-field.spw", "0000000", "100644", join(dir, "new.spw"), "1111111", "100644");
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^spinwright diff a\/samples\/m\.spw -> b\/samples\/m\.spw/);
    expect(r.out).toMatch(/protected -> not protected/);
  });
});
