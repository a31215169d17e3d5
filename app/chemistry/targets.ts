// Default target ranges. Each entry says which published source it follows and its tag in
// chemistry.md ([P] primary text seen, [S] secondary, [M] memory, [D] derived).

import type { Guidance, Parameter, Range, Sanitiser, TargetRanges } from "./types";

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

// ------------------------------------------------------------------ guidance the owner can choose
//
// The defaults above follow the CDC's advice for home hot tubs. Where published guidance differs,
// a tub's settings choose which one the plan follows; the plan names it.

export interface GuidanceProfile {
  id: Guidance;
  name: string;
  /** Highest combined chlorine (total − free) before the water needs breaking (mg/L). */
  combinedChlorineMax: number;
  combinedChlorineSource: string;
  /** Ranges that differ from the home-tub defaults. */
  ranges: Partial<Record<Sanitiser, Partial<Record<Parameter, Range>>>>;
}

const NSPI2 = "ANSI/NSPI-2 public spas as adopted in Maine 10-144 CMR ch. 202 App. A [P]";
const HSG282 = "UK HSE HSG282 (2017) spa-pool guidance [S]";

export const GUIDANCE: Record<Guidance, GuidanceProfile> = {
  us_home: {
    id: "us_home",
    name: "Home hot tub (CDC hot tub user information)",
    combinedChlorineMax: 0.5,
    combinedChlorineSource: `combined chlorine at most 0.5 mg/L, ${NSPI2}`,
    ranges: {},
  },
  us_public: {
    id: "us_public",
    name: "US public spa codes (Model Aquatic Health Code, ANSI/NSPI-2)",
    combinedChlorineMax: 0.5,
    combinedChlorineSource: `combined chlorine at most 0.5 mg/L, ${NSPI2}`,
    ranges: {
      chlorine: {
        // MAHC spa minimum 3 mg/L [S]; NSPI-2 ideal 4–5, max 8 [P].
        free_chlorine: { min: 3, max: 8, aim: 4.5, source: `MAHC spa minimum 3 mg/L [S]; ${NSPI2}: ideal 4–5, max 8` },
        // MAHC 2018 CYA maximum 90 [S].
        cyanuric_acid: { min: 0, max: 90, aim: 30, source: "MAHC 2018 maximum 90 mg/L [S]" },
      },
      bromine: {
        // MAHC §5.7.3.1.2.2 spa minimum 4.0 [P]; NSPI-2 spa cell 6–8 ideal, 10 max (layout ambiguous) [P].
        bromine: { min: 4, max: 8, aim: 6, source: `MAHC §5.7.3.1.2.2 spa minimum 4.0 [P]; ${NSPI2}: up to 8 ideal` },
      },
    },
  },
  uk: {
    id: "uk",
    name: "UK spa-pool guidance (HSE HSG282)",
    combinedChlorineMax: 1,
    combinedChlorineSource: `combined chlorine ideally 0, under 1 mg/L acceptable, ${HSG282}`,
    ranges: {
      chlorine: {
        free_chlorine: { min: 3, max: 5, aim: 4, source: `${HSG282}: free chlorine 3–5` },
        ph: { min: 7.0, max: 7.6, aim: 7.3, source: `${HSG282}: pH 7.0–7.6` },
      },
      bromine: {
        bromine: { min: 4, max: 6, aim: 5, source: `${HSG282}: bromine 4–6` },
        ph: { min: 7.0, max: 7.6, aim: 7.3, source: `${HSG282}: pH 7.0–7.6` },
      },
    },
  },
};

export const GUIDANCE_IDS = Object.keys(GUIDANCE) as Guidance[];

export function guidanceProfile(id: Guidance | undefined | null): GuidanceProfile {
  return GUIDANCE[id ?? "us_home"] ?? GUIDANCE.us_home;
}

/** Merge per-tub overrides into the defaults of the chosen guidance; a broken override (min > max) is rejected. */
export function resolveTargets(
  sanitiser: Sanitiser,
  overrides?: Partial<Record<Parameter, Partial<Range>>>,
  guidance?: Guidance | null,
): TargetRanges {
  const base = { ...DEFAULT_TARGETS[sanitiser], ...(guidanceProfile(guidance).ranges[sanitiser] ?? {}) } as TargetRanges;
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
