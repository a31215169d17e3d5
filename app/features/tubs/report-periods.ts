// The visit report's periods and list bounds, shared by the server and the screen.
export const REPORT_PERIODS = [7, 30, 90] as const;
export const REPORT_DEFAULT_DAYS = 30;
/** At most this many of each, newest first; the report says when there were more. */
export const REPORT_LIMITS = { readings: 40, treatments: 40, notes: 20 } as const;

export function reportDays(asked: string | null): number {
  const n = Number(asked);
  return (REPORT_PERIODS as readonly number[]).includes(n) ? n : REPORT_DEFAULT_DAYS;
}
