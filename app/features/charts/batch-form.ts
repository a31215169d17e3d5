// Form fields a strip batch takes on both chart pages (new chart with its first batch; a chart's batches).
import { z } from "zod";

/** The batch's expiry date as the date input sends it (yyyy-mm-dd), or null when left empty. */
export const expiresOnField = z
  .string()
  .trim()
  .refine((v) => v === "" || /^\d{4}-\d{2}-\d{2}$/.test(v), "Enter the expiry date as a date.")
  .transform((v) => v || null);
