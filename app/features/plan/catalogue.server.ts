// The owner's product catalogue: the default catalogue with the owner's edited copies laid over it.
import { and, eq } from "drizzle-orm";
import { z } from "zod";
import { DEFAULT_PRODUCTS, type Product, type ProductForm } from "~/chemistry";
import { product as productTable } from "~/db/schema";
import { db } from "~/lib/db.server";

export type ProductRow = typeof productTable.$inferSelect;

export interface CatalogueEntry {
  product: Product;
  /** the default entry, for products copied from the catalogue */
  base: Product | null;
  edited: boolean;
}

import { FORMS, PACKAGE_UNITS } from "./shared";
export { FORMS, PACKAGE_UNITS } from "./shared";

/** An edited copy over its default entry. */
export function applyEdit(base: Product, row: ProductRow): Product {
  const out: Product = { ...base, name: row.name || base.name, form: (FORMS as string[]).includes(row.form) ? (row.form as ProductForm) : base.form, strength: row.strength };
  if (row.densityGPerMl !== null) out.densityGPerMl = row.densityGPerMl;
  if (row.packageSize !== null && row.packageUnit && (PACKAGE_UNITS as readonly string[]).includes(row.packageUnit))
    out.packageSize = { amount: row.packageSize, unit: row.packageUnit as Product["packageSize"]["unit"] };
  // A changed strength or density of liquid chlorine: the strength decides, not the label's g/L figure.
  if (base.availableChlorineGPerL !== undefined && (row.strength !== base.strength || (out.densityGPerMl ?? 1) !== (base.densityGPerMl ?? 1)))
    delete out.availableChlorineGPerL;
  return out;
}

export function mergeCatalogue(rows: ProductRow[]): CatalogueEntry[] {
  const entries: CatalogueEntry[] = DEFAULT_PRODUCTS.map((base) => {
    const row = rows.find((r) => r.catalogueId === base.id);
    return { product: row ? applyEdit(base, row) : base, base, edited: Boolean(row) };
  });
  for (const row of rows.filter((r) => r.catalogueId === null)) {
    entries.push({
      base: null,
      edited: true,
      product: {
        id: row.id,
        name: row.name,
        chemical: row.chemical,
        form: (FORMS as string[]).includes(row.form) ? (row.form as ProductForm) : "granules",
        strength: row.strength,
        densityGPerMl: row.densityGPerMl ?? undefined,
        packageSize: { amount: row.packageSize ?? 1, unit: (row.packageUnit as Product["packageSize"]["unit"]) ?? "kg" },
        cautions: [],
      },
    });
  }
  return entries;
}

export async function ownerCatalogue(ownerId: string): Promise<CatalogueEntry[]> {
  const rows = await db.select().from(productTable).where(eq(productTable.ownerId, ownerId));
  return mergeCatalogue(rows);
}

export async function ownerProducts(ownerId: string): Promise<Product[]> {
  return (await ownerCatalogue(ownerId)).map((e) => e.product);
}

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);
const numberField = (what: string) =>
  z.preprocess(
    blankToUndefined,
    z.coerce.number({ error: `${what} must be a number.` }).refine(Number.isFinite, `${what} must be a number.`),
  );

const editSchema = z.object({
  catalogueId: z.string().min(1, "Choose a product."),
  name: z.string().trim().min(1, "Give the product a name.").max(120, "Keep the name under 120 characters."),
  form: z.enum(FORMS, { error: "Choose granules, powder, liquid or tablets." }),
  strengthPercent: numberField("Strength"),
  densityGPerMl: z.preprocess(blankToUndefined, numberField("Density").optional()),
  packageSize: numberField("Package size"),
  packageUnit: z.enum(PACKAGE_UNITS, { error: "Choose g, kg, mL or L." }),
});

export type FieldErrors = Record<string, string>;

/** Checks an edit of a catalogue product; returns the row values or the errors in plain words. */
export function parseProductEdit(form: FormData): { ok: true; values: Omit<typeof productTable.$inferInsert, "ownerId"> } | { ok: false; fields: FieldErrors; form?: string } {
  const parsed = editSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) {
    const fields: FieldErrors = {};
    for (const issue of parsed.error.issues) {
      const key = String(issue.path[0] ?? "form");
      fields[key] ??= issue.message;
    }
    return { ok: false, fields };
  }
  const v = parsed.data;
  const base = DEFAULT_PRODUCTS.find((p) => p.id === v.catalogueId);
  if (!base) return { ok: false, fields: {}, form: "That product is not in the catalogue." };
  const fields: FieldErrors = {};
  if (v.strengthPercent <= 0)
    fields.strengthPercent = "Strength cannot be zero or negative: give the percentage of active ingredient (for example 93 for 93 %).";
  else if (v.strengthPercent > 100) fields.strengthPercent = `A strength of ${v.strengthPercent} % is impossible: it must be 100 % or less.`;
  else if (v.strengthPercent < 1)
    fields.strengthPercent = `A strength of ${v.strengthPercent} % is too weak to dose with; check the label (give the percentage, for example 93, not 0.93).`;
  else if (base.chemical.startsWith("sodium_dichloroisocyanurate") && v.strengthPercent < 80)
    fields.strengthPercent = `${v.strengthPercent} % looks like the label's available chlorine, not the purity: dichlor is sold nearly pure (pure dichlor dihydrate has 55.4 % available chlorine). Give the purity, usually 95–100 %.`;
  const density = v.densityGPerMl ?? (v.form === "liquid" ? (base.densityGPerMl ?? 1) : undefined);
  if (v.form === "liquid" && density !== undefined && !(density >= 0.5 && density <= 2.5))
    fields.densityGPerMl = "The density of a liquid must be between 0.5 and 2.5 g/mL (water is 1.0).";
  const grams = { g: 1, kg: 1000, mL: 1, L: 1000 }[v.packageUnit] * v.packageSize;
  if (!(v.packageSize > 0)) fields.packageSize = "The package size must be above 0.";
  else if (grams > 1_000_000) fields.packageSize = "That package is bigger than a tonne; check the size and unit.";
  if ((v.form === "liquid") !== (v.packageUnit === "mL" || v.packageUnit === "L"))
    fields.packageUnit = v.form === "liquid" ? "Give a liquid's package size in mL or L." : "Give a solid's package size in g or kg.";
  if (Object.keys(fields).length) return { ok: false, fields };
  return {
    ok: true,
    values: {
      catalogueId: base.id,
      name: v.name,
      chemical: base.chemical,
      form: v.form,
      strength: Math.round(v.strengthPercent * 100) / 10000,
      densityGPerMl: v.form === "liquid" ? (density ?? null) : null,
      packageSize: v.packageSize,
      packageUnit: v.packageUnit,
    },
  };
}

export async function saveProductEdit(ownerId: string, values: Omit<typeof productTable.$inferInsert, "ownerId">) {
  const existing = await db.query.product.findFirst({ where: and(eq(productTable.ownerId, ownerId), eq(productTable.catalogueId, values.catalogueId!)) });
  if (existing) await db.update(productTable).set(values).where(eq(productTable.id, existing.id));
  else await db.insert(productTable).values({ ...values, ownerId });
}

export async function resetProduct(ownerId: string, catalogueId: string) {
  await db.delete(productTable).where(and(eq(productTable.ownerId, ownerId), eq(productTable.catalogueId, catalogueId)));
}
