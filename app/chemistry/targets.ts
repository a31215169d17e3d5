// Default target ranges. Each entry says which published source it follows and its tag in
// chemistry.md ([P] primary text seen, [S] secondary, [M] memory, [D] derived).

import type { Parameter, Range, Sanitiser, TargetRanges } from "./types";

const CDC_USER_INFO = "CDC 'Hot Tub/Spa User Information' (archived copy) [P]";

// Total alkalinity: New York 10 NYCRR §6-1.30 "normal control levels" 80–120 mg/L [P]
// (seen in the regulation text); the APSP-11-style ideal ranges in Montana ARM 37.115 Table 6
// (80–100 hypochlorites, 100–120 dichlor/bromine) lie inside it [P].
const TA: Range = {
  min: 80,
  max: 120,
  aim: 100,
  source: "10 NYCRR §6-1.30 normal control levels 80–120 [P]; Montana ARM 37.115 Table 6 ideal ranges [P]",
};

// Calcium hardness for spas: Montana ARM 37.115 Table 6, spas ideal 150–250 mg/L [P].
const CH: Range = { min: 150, max: 250, aim: 200, source: "Montana ARM 37.115 Table 6, spas ideal 150–250 [P]" };

// pH: CDC hot tub user information 7.2–7.8 [P]; aim 7.5, the middle (APSP-11 ideal 7.4–7.6 [M]).
const PH: Range = { min: 7.2, max: 7.8, aim: 7.5, source: `${CDC_USER_INFO}; aim 7.5 is the middle of the range` };

export const DEFAULT_TARGETS: Record<Sanitiser, TargetRanges> = {
  chlorine: {
    // CDC user information: free chlorine 2–4 mg/L [P]. Public spas may need more (MAHC spa min 3 [S]).
    free_chlorine: { min: 2, max: 4, aim: 3, source: `${CDC_USER_INFO}: free chlorine 2–4` },
    // Not the tub's sanitiser: judged only when read.
    bromine: { min: 0, max: 0, aim: 0, source: "not used in a chlorine tub" },
    ph: PH,
    total_alkalinity: TA,
    calcium_hardness: CH,
    // Montana ARM 37.115.1308(3): CYA no more than 50 ppm whenever used [P]; the MAHC 2018 maximum
    // is 90 [S]. Dichlor adds 0.91 mg/L CYA per mg/L chlorine (chemistry.md §2.3 [D]).
    cyanuric_acid: { min: 0, max: 50, aim: 30, source: "Montana ARM 37.115.1308(3) max 50 [P]; MAHC 2018 max 90 [S]" },
  },
  bromine: {
    free_chlorine: { min: 0, max: 0, aim: 0, source: "not used in a bromine tub" },
    // CDC user information: bromine 4–6 mg/L [P]; WHO 2007 (Legionella) 4–6 total bromine [P].
    bromine: { min: 4, max: 6, aim: 5, source: `${CDC_USER_INFO}: bromine 4–6; WHO 2007 4–6 [P]` },
    ph: PH,
    total_alkalinity: TA,
    calcium_hardness: CH,
    // Cyanuric acid does not stabilise bromine; it is not used in bromine tubs (common practice;
    // Montana Table 6 allows it only in outdoor pools [P]).
    cyanuric_acid: { min: 0, max: 30, aim: 0, source: "common practice: no stabiliser with bromine" },
  },
};

/** Merge per-tub overrides into the defaults; a broken override (min > max) is rejected. */
export function resolveTargets(
  sanitiser: Sanitiser,
  overrides?: Partial<Record<Parameter, Partial<Range>>>,
): TargetRanges {
  const base = DEFAULT_TARGETS[sanitiser];
  const out = { ...base } as TargetRanges;
  if (!overrides) return out;
  for (const key of Object.keys(overrides) as Parameter[]) {
    const o = overrides[key];
    if (!o || !(key in base)) continue;
    const merged: Range = { ...base[key], ...o, source: o.source ?? "set for this tub" };
    if (o.aim === undefined) merged.aim = Math.min(merged.max, Math.max(merged.min, base[key].aim));
    if (o.aim === undefined && (o.min !== undefined || o.max !== undefined) && !(base[key].aim >= merged.min && base[key].aim <= merged.max))
      merged.aim = (merged.min + merged.max) / 2;
    if (!(merged.min <= merged.aim && merged.aim <= merged.max) || ![merged.min, merged.max, merged.aim].every(Number.isFinite))
      throw new RangeError(`The target range for ${key.replace(/_/g, " ")} must have min ≤ aim ≤ max.`);
    out[key] = merged;
  }
  return out;
}
