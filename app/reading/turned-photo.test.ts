// A photo turned by an odd angle before it is sent (an editor's "straighten" tool, a rotated
// screenshot) has corners of flat black fill. The fill is no strip and no plastic: it must not
// stop the search for the strip nor break the light correction (common practice: rotating an
// image by a non-right angle pads the new corners with a background colour, black by default in
// libvips, which sharp wraps; see sharp's rotate() documentation).
import fs from "node:fs";
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { renderStripPhoto } from "../../tests/render/strip-photo";
import { asRenderChart } from "../../tests/render/types";
import { parseChart } from "./chart";
import { readStrip } from "./index";

const demo3Json = JSON.parse(fs.readFileSync("calibration/demo-3pad.json", "utf8"));
const demo3 = parseChart(demo3Json);

describe("a photo turned with black corners", () => {
  it("reads every pad within half a chart step", async () => {
    for (const [seed, angle] of [[31, 23], [32, -127]] as const) {
      const photo = await renderStripPhoto(asRenderChart(demo3Json), { seed, surface: "paper", pxPerMm: 9 });
      const turned = await sharp(photo.jpeg).rotate(angle, { background: "#000000" }).jpeg({ quality: 90 }).toBuffer();
      const r = await readStrip(turned, demo3);
      for (const t of photo.truth) {
        const p = r.pads.find((q) => q.analyte === t.analyte)!;
        expect(Math.abs(p.swatchIndex - t.index)).toBeLessThanOrEqual(0.5);
      }
    }
  });
});
