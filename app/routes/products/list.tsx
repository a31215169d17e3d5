import { Form, data, redirect } from "react-router";
import { availableChlorineOfChemical } from "~/chemistry";
import { chemicalName } from "~/components/plan/plan-ui";
import { Button, Card, Field, Input, Notice, PageTitle, Select } from "~/components/ui";
import { ownerCatalogue, parseProductEdit, resetProduct, saveProductEdit } from "~/features/plan/catalogue.server";
import { FORMS, PACKAGE_UNITS } from "~/features/plan/shared";
import { requireUser } from "~/lib/session.server";
import { saveUserUnits, userUnits } from "~/features/plan/units.server";
import type { Route } from "./+types/list";

export const meta: Route.MetaFunction = () => [{ title: "Products · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const entries = await ownerCatalogue(user.id);
  const url = new URL(request.url);
  return {
    units: await userUnits(user.id),
    saved: url.searchParams.get("saved"),
    products: entries
      .filter((e) => e.base)
      .map((e) => ({
        id: e.product.id,
        name: e.product.name,
        chemical: e.product.chemical,
        form: e.product.form,
        strengthPercent: Math.round(e.product.strength * 10000) / 100,
        densityGPerMl: e.product.densityGPerMl ?? null,
        packageSize: e.product.packageSize.amount,
        packageUnit: e.product.packageSize.unit,
        edited: e.edited,
        defaultStrengthPercent: Math.round(e.base!.strength * 10000) / 100,
        availableChlorinePerPure: chlorineFraction(e.product.chemical, e.product.form),
      })),
  };
}

/** Available chlorine of the pure ingredient, for solid chlorine products (liquids are dosed by g/L). */
function chlorineFraction(chemical: string, form: string) {
  if (form === "liquid") return null;
  try {
    return availableChlorineOfChemical(chemical);
  } catch {
    return null;
  }
}

export async function action({ context, request }: Route.ActionArgs) {
  const user = requireUser(context, request);
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "units") {
    if (!(await saveUserUnits(user.id, String(form.get("units") ?? "")))) return data({ catalogueId: "", fields: {} as Record<string, string>, form: "Choose metric or US units." }, { status: 400 });
    return redirect("/products?saved=units");
  }
  const catalogueId = String(form.get("catalogueId") ?? "");
  if (intent === "reset") {
    await resetProduct(user.id, catalogueId);
    return redirect(`/products?saved=${encodeURIComponent(catalogueId)}`);
  }
  if (intent !== "save") return data({ catalogueId, fields: {} as Record<string, string>, form: "Unknown action." }, { status: 400 });
  const parsed = parseProductEdit(form);
  if (!parsed.ok) return data({ catalogueId, fields: parsed.fields, form: parsed.form ?? "Not saved: please fix what is marked." }, { status: 400 });
  await saveProductEdit(user.id, parsed.values);
  return redirect(`/products?saved=${encodeURIComponent(catalogueId)}`);
}

export default function ProductsPage({ loaderData, actionData }: Route.ComponentProps) {
  const { products, saved, units } = loaderData;
  return (
    <div className="space-y-5">
      <PageTitle sub="The plan doses with these products. Copy the strength (percentage of active ingredient), form and package size from your product labels.">Products</PageTitle>
      <Card data-testid="units-setting">
        <h2 className="text-lg font-bold">Your units</h2>
        <p className="mb-3 text-sm text-ink-soft">How plans and routines show amounts, volumes and temperatures, for all your tubs.</p>
        {saved === "units" && <Notice tone="ok" className="mb-3">Units saved.</Notice>}
        <Form method="post" className="flex flex-wrap items-end gap-3">
          <input type="hidden" name="intent" value="units" />
          <Field label="Show amounts in">
            <Select name="units" defaultValue={units}>
              <option value="metric">grams, millilitres, litres, °C</option>
              <option value="us">ounces, fluid ounces, US gallons, °F (with grams and mL)</option>
            </Select>
          </Field>
          <Button type="submit" variant="secondary">Save units</Button>
        </Form>
      </Card>
      {products.map((p) => {
        const mine = actionData?.catalogueId === p.id ? actionData : null;
        const f = mine?.fields ?? {};
        return (
          <Card key={p.id} data-testid={`product-${p.id}`}>
            <h2 className="text-lg font-bold">{p.name}</h2>
            <p className="mb-3 text-sm text-ink-soft">
              Active ingredient: {chemicalName(p.chemical)}
              {p.edited ? ` · your copy (default strength ${p.defaultStrengthPercent} %)` : " · default catalogue entry"}
            </p>
            {saved === p.id && <Notice tone="ok" className="mb-3">Saved. The plan uses it from now on.</Notice>}
            {mine?.form && <Notice tone="alert" className="mb-3">{mine.form}</Notice>}
            <Form method="post" className="space-y-3">
              <input type="hidden" name="intent" value="save" />
              <input type="hidden" name="catalogueId" value={p.id} />
              <Field label="Name" error={f.name}>
                <Input name="name" defaultValue={p.name} />
              </Field>
              <div className="grid grid-cols-2 gap-3">
                <Field
                  label="Strength (%)"
                  hint={p.availableChlorinePerPure ? "purity of the active ingredient" : "active ingredient"}
                  error={f.strengthPercent}
                >
                  <Input name="strengthPercent" inputMode="decimal" defaultValue={String(p.strengthPercent)} />
                </Field>
                <Field label="Form" error={f.form}>
                  <Select name="form" defaultValue={p.form}>
                    {FORMS.map((x) => (
                      <option key={x} value={x}>{x}</option>
                    ))}
                  </Select>
                </Field>
                <Field label="Package size" error={f.packageSize}>
                  <Input name="packageSize" inputMode="decimal" defaultValue={String(p.packageSize)} />
                </Field>
                <Field label="Unit" error={f.packageUnit}>
                  <Select name="packageUnit" defaultValue={p.packageUnit}>
                    {PACKAGE_UNITS.map((x) => (
                      <option key={x} value={x}>{x}</option>
                    ))}
                  </Select>
                </Field>
                {p.form === "liquid" && (
                  <Field label="Density (g/mL)" error={f.densityGPerMl}>
                    <Input name="densityGPerMl" inputMode="decimal" defaultValue={p.densityGPerMl === null ? "" : String(p.densityGPerMl)} />
                  </Field>
                )}
              </div>
              {p.availableChlorinePerPure && (
                <p className="text-sm text-caution" data-testid="available-chlorine-hint">
                  At {p.strengthPercent} % this gives about {Math.round(p.strengthPercent * p.availableChlorinePerPure * 10) / 10} % available
                  chlorine. Labels often print the available chlorine instead: if yours says, for example, 55 % available chlorine,
                  enter {Math.round((55 / p.availableChlorinePerPure) * 10) / 10} % here, not 55 %, or the plan would give too much.
                </p>
              )}
              <div className="flex flex-wrap gap-2">
                <Button type="submit">Save</Button>
              </div>
            </Form>
            {p.edited && (
              <Form method="post" className="mt-2">
                <input type="hidden" name="intent" value="reset" />
                <input type="hidden" name="catalogueId" value={p.id} />
                <Button type="submit" variant="quiet">Back to the default</Button>
              </Form>
            )}
          </Card>
        );
      })}
      <Notice tone="info">Product labels decide: follow the label's own amounts and cautions where they differ from the plan.</Notice>
    </div>
  );
}
