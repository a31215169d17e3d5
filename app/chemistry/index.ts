// Water-chemistry engine: pure functions, no database, no HTTP.

export * from "./types";
export { ANALYTES, analyteLabel, analyteName, analyteWord, type KnownAnalyte } from "./analytes";
export { planTreatment, AUTHORITY_NOTE, DEFAULT_TEMPERATURE_C, type PlanOptions } from "./plan";
export { langelier, BALANCED_BAND, type LangelierInput, type LangelierResult } from "./lsi";
export { DEFAULT_TARGETS, GUIDANCE, GUIDANCE_IDS, guidanceProfile, resolveTargets } from "./targets";
export { DEFAULT_PRODUCTS, OPTIONAL_PRODUCTS, WAIT_HOURS, cautionsFor, chemicalCautions, generalCautions, waitHoursFor } from "./products";
export { hasNonFinite, validateWaterInput, WaterInputError } from "./validate";
export { estimateVolumeLitres, litresFromUsGallons, usGallonsFromLitres, drainIntervalDays, type Shape, type InsideDimsCm } from "./volume";
export { firstFillRoutine, routineTopUp, foamTreatment, type RoutineStep } from "./routines";
export { carbonateConstants, calciteSaturationIndex } from "./carbonate";
export { ProductError, availableChlorineOfChemical } from "./doses";
export { activeLock, isShockDose, waitHoursForLogged, type Lock } from "./lock";
export {
  celsiusFromFahrenheit,
  centimetresFromInches,
  displayAmount,
  fahrenheitFromCelsius,
  kitchenMeasure,
  litresFromImperialGallons,
  imperialGallonsFromLitres,
  temperatureWords,
  volumeWords,
} from "./units";
