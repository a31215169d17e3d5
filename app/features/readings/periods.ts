// The periods the trends can show, in days; the default is the first. Shared by the page and the API.
export const TREND_PERIODS = [90, 30, 7, 365, 1095] as const;
export const MAX_TREND_DAYS = 3660;
