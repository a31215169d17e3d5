// npm run -s water-plan -- <input.json | ->
// Prints one JSON plan on stdout; bad input exits 1 with one plain line on stderr.

import { readFileSync } from "node:fs";
import { ProductError } from "./doses";
import { planTreatment } from "./plan";
import { hasNonFinite, validateWaterInput, WaterInputError } from "./validate";


export const HELP = `Usage: npm run -s water-plan -- <input.json>   (or - for standard input)

Prints one JSON plan: { headline, steps, waterBalance, predicted, judgements, trends, guidance, notes }.
Bad input exits 1 with one plain line on standard error.

Input (concentrations in mg/L; alkalinity and hardness as CaCO3):
  volumeLitres | volumeGallons   exactly one (volumeGallons: US gallons)
  temperatureC | temperatureF    the water now (optional; one of them)
  setTemperatureC                the tub's running temperature (optional)
  sanitiser                      "chlorine" or "bromine"
  readings                       free_chlorine, total_chlorine, bromine, ph, total_alkalinity,
                                 total_hardness, calcium_hardness, cyanuric_acid, borate (null = not measured)
  mode                           "routine" (default) or "first_fill" (start-up of new water)
  units                          "metric" (default) or "us" (ounces, fluid ounces, US kitchen measures)
  guidance                       "us_home" (default, CDC), "us_public" (MAHC / ANSI-NSPI-2) or "uk" (HSE HSG282)
  tds, fillTds, bathersPerDay    optional: dissolved solids of the tub and of the fill water; use
  products                       optional catalogue; chlorine products may give availableChlorine
                                 (0–1, the label's figure) instead of strength; both must agree
  targets, treatmentLog, now     optional: per-tub ranges, recent doses (the plan waits), the time now
An unknown field anywhere in the input is an error that names it.

Output "predicted": every parameter and the Langelier index after all steps (at the measured and the
set temperature) and "usableAfter", when the tub may be used again.
`;

function main(argv: string[]): number {
  const arg = argv[0];
  if (arg === "--help" || arg === "-h") {
    process.stdout.write(HELP);
    return 0;
  }
  if (!arg || argv.length > 1) {
    process.stderr.write("Usage: npm run -s water-plan -- <input.json> (or - for standard input); --help describes the input\n");
    return 2;
  }
  let text: string;
  try {
    text = arg === "-" ? readFileSync(0, "utf8") : readFileSync(arg, "utf8");
  } catch {
    process.stderr.write(`Cannot read the input file "${arg}".\n`);
    return 1;
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    process.stderr.write("The input is not valid JSON.\n");
    return 1;
  }
  try {
    const input = validateWaterInput(json);
    const plan = planTreatment(input);
    if (hasNonFinite(plan)) {
      process.stderr.write("The plan could not be computed for these readings; please check them.\n");
      return 1;
    }
    process.stdout.write(JSON.stringify(plan, null, 2) + "\n");
    return 0;
  } catch (e) {
    if (e instanceof WaterInputError || e instanceof ProductError || e instanceof RangeError) {
      process.stderr.write(e.message.split("\n")[0] + "\n");
      return 1;
    }
    process.stderr.write("The plan could not be computed; please check the input.\n");
    return 1;
  }
}

process.exitCode = main(process.argv.slice(2));
