// The signed-in person's units: metric (g, mL, L, °C) or US (oz, fl oz, US gal, °F).
import { eq } from "drizzle-orm";
import type { Units } from "~/chemistry";
import { user } from "~/db/schema";
import { db } from "~/lib/db.server";

export async function userUnits(userId: string): Promise<Units> {
  const [row] = await db.select({ units: user.units }).from(user).where(eq(user.id, userId)).limit(1);
  return row?.units === "us" ? "us" : "metric";
}

export async function saveUserUnits(userId: string, units: string): Promise<boolean> {
  if (units !== "us" && units !== "metric") return false;
  await db.update(user).set({ units }).where(eq(user.id, userId));
  return true;
}
