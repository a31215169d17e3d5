// npm run -s water-plan -- <input.json | ->
// Prints one JSON plan on stdout; bad input exits 1 with one plain line on stderr.

import { readFileSync } from "node:fs";
import { ProductError } from "./doses";
import { planTreatment } from "./plan";
import { hasNonFinite, validateWaterInput, WaterInputError } from "./validate";


function main(argv: string[]): number {
  const arg = argv[0];
  if (!arg || argv.length > 1) {
    process.stderr.write("Usage: npm run -s water-plan -- <input.json> (or - for standard input)\n");
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
