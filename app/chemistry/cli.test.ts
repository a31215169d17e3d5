import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";

// Contract: /work/shared/eval/water-plan.md — one JSON object on stdout; bad input exits non-zero
// with one plain line on stderr and never a plan with NaN.
const CLI = join(import.meta.dirname, "cli.ts");
const run = (args: string[], input?: string) =>
  spawnSync(process.execPath, ["--import", "tsx", CLI, ...args], { input, encoding: "utf8", cwd: join(import.meta.dirname, "../..") });

const good = {
  volumeLitres: 1200,
  temperatureC: 38,
  sanitiser: "chlorine",
  readings: { free_chlorine: 0.5, ph: 7.9, total_alkalinity: 60, total_hardness: 150, cyanuric_acid: 20, bromine: null },
  tds: 1000,
  bathersPerDay: 2,
};

describe("water-plan command", () => {
  it("prints one JSON plan for a file and for stdin", () => {
    const dir = mkdtempSync(join(tmpdir(), "water-plan-"));
    const file = join(dir, "in.json");
    writeFileSync(file, JSON.stringify(good));
    for (const r of [run([file]), run(["-"], JSON.stringify(good))]) {
      expect(r.status).toBe(0);
      const plan = JSON.parse(r.stdout);
      expect(Array.isArray(plan.steps)).toBe(true);
      expect(plan.steps[0].chemical).toBe("sodium_dichloroisocyanurate_dihydrate");
      expect(typeof plan.waterBalance.lsi).toBe("number");
      expect(r.stdout).not.toMatch(/NaN|Infinity/);
    }
  });

  const bad: [string, string][] = [
    ["negative volume", JSON.stringify({ ...good, volumeLitres: -5 })],
    ["absurd volume", JSON.stringify({ ...good, volumeLitres: 5e6 })],
    ["pH above 14", JSON.stringify({ ...good, readings: { ...good.readings, ph: 15 } })],
    ["negative concentration", JSON.stringify({ ...good, readings: { ...good.readings, free_chlorine: -1 } })],
    ["unknown sanitiser", JSON.stringify({ ...good, sanitiser: "ozone" })],
    ["malformed JSON", "{ volumeLitres: 1200,"],
    ["TA in meq/L", JSON.stringify({ ...good, readings: { ...good.readings, total_alkalinity: 1.2 } })],
    ["implausible free chlorine", JSON.stringify({ ...good, readings: { ...good.readings, free_chlorine: 400 } })],
    ["zero-strength product", JSON.stringify({ ...good, products: [{ id: "d", name: "dichlor", chemical: "sodium_dichloroisocyanurate_dihydrate", form: "granules", strength: 0 }] })],
    ["missing readings", JSON.stringify({ volumeLitres: 1200, sanitiser: "chlorine" })],
    ["Infinity via 1e400", '{"volumeLitres":1e400,"sanitiser":"chlorine","readings":{}}'],
    ["an unknown field (gallons misspelt)", JSON.stringify({ ...good, volumeLitres: undefined, volumeGalons: 400 })],
    ["both volumes", JSON.stringify({ ...good, volumeGallons: 400 })],
  ];
  it("takes US gallons and °F, prints ounces and the predicted water; --help describes the contract", () => {
    const r = run(["-"], JSON.stringify({ ...good, volumeLitres: undefined, volumeGallons: 317, temperatureC: undefined, temperatureF: 100, units: "us" }));
    expect(r.status).toBe(0);
    const plan = JSON.parse(r.stdout);
    expect(plan.steps[0].ounces).toBeGreaterThan(0);
    expect(plan.steps[0].amountText).toMatch(/oz/);
    expect(plan.predicted.free_chlorine).toBe(3);
    expect(Object.keys(plan.predicted)).toEqual(expect.arrayContaining(["ph", "total_alkalinity", "lsi", "usableAfter"]));
    const h = run(["--help"]);
    expect(h.status).toBe(0);
    expect(h.stdout).toMatch(/volumeGallons/);
    expect(h.stdout).toMatch(/first_fill/);
  });

  it.each(bad)("rejects %s with one plain line on stderr", (_name, text) => {
    const r = run(["-"], text);
    expect(r.status).not.toBe(0);
    expect(r.stdout).toBe("");
    const lines = r.stderr.trim().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]!.length).toBeGreaterThan(10);
    expect(lines[0]).not.toMatch(/at .*\.ts:|ZodError|undefined/);
  });
});
