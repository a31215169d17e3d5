// The tub settings form, shared by "Add a tub" and "Edit tub", with the volume helper.
import { useState } from "react";
import { Form } from "react-router";
import { GUIDANCE, estimateVolumeLitres, imperialGallonsFromLitres, usGallonsFromLitres, type Guidance, type Shape } from "~/chemistry";
import { Button, Card, Field, Input, Notice, Select } from "~/components/ui";

export type TubFormValues = {
  name: string;
  volume: string;
  volumeUnit: "L" | "USgal" | "UKgal";
  sanitiser: "chlorine" | "bromine";
  batchId: string;
  timeZone: string;
  setTemperature: string;
  temperatureUnit: "C" | "F";
  bathersPerDay: string;
  guidance: Guidance;
};

const UNIT_WORDS = { L: "litres", USgal: "US gallons", UKgal: "imperial gallons" } as const;

export function TubForm({
  initial,
  batches,
  errors,
  formError,
  submitLabel,
}: {
  initial: TubFormValues;
  batches: { id: string; label: string }[];
  errors?: Partial<Record<string, string>>;
  formError?: string;
  submitLabel: string;
}) {
  const [volume, setVolume] = useState(initial.volume);
  const [unit, setUnit] = useState(initial.volumeUnit);
  const [shape, setShape] = useState<Shape>("round");
  const [dims, setDims] = useState({ diameter: "", side: "", length: "", width: "", depth: "", seats: "" });
  const [helperOpen, setHelperOpen] = useState(false);
  // gallons go with inches, litres with centimetres
  const inches = unit !== "L";
  const dimUnit = inches ? "in" : "cm";

  let estimate: number | null = null;
  let estimateError = "";
  const n = (s: string) => Number(s.replace(",", "."));
  const cm = (s: string) => n(s) * (inches ? 2.54 : 1);
  if (dims.depth) {
    try {
      const inside = shape === "round" ? { diameter: cm(dims.diameter) } : shape === "square" ? { side: cm(dims.side) } : { length: cm(dims.length), width: cm(dims.width) };
      estimate = estimateVolumeLitres(shape, inside, cm(dims.depth), { seats: dims.seats ? n(dims.seats) : 0 });
    } catch (e) {
      estimateError = (e as Error).message.replace("centimetres", inches ? "inches" : "centimetres");
    }
  }
  const estimateInUnit = estimate === null ? null : Math.round(unit === "USgal" ? usGallonsFromLitres(estimate) : unit === "UKgal" ? imperialGallonsFromLitres(estimate) : estimate);

  return (
    <Form method="post" className="space-y-5" noValidate>
      {formError && <Notice tone="alert">{formError}</Notice>}
      <Card className="space-y-4">
        <Field label="Name" hint="What you call this tub, e.g. “Garden tub”." error={errors?.name}>
          <Input name="name" defaultValue={initial.name} required maxLength={80} autoComplete="off" />
        </Field>
        <div className="grid grid-cols-[1fr_auto] items-end gap-3">
          <Field label="Water volume" error={errors?.volume}>
            <Input name="volume" inputMode="decimal" value={volume} onChange={(e) => setVolume(e.target.value)} required />
          </Field>
          <label className="block">
            <span className="sr-only">Unit</span>
            <Select name="volumeUnit" value={unit} onChange={(e) => setUnit(e.target.value as TubFormValues["volumeUnit"])} aria-label="Volume unit">
              <option value="L">litres</option>
              <option value="USgal">US gallons</option>
              <option value="UKgal">imperial gallons</option>
            </Select>
          </label>
        </div>
        <div>
          <button type="button" className="font-bold text-well-700 underline" onClick={() => setHelperOpen((o) => !o)} aria-expanded={helperOpen}>
            {helperOpen ? "Hide the volume helper" : "Not sure? Estimate it from the tub's shape"}
          </button>
          {helperOpen && (
            <div className="mt-3 space-y-3 rounded-xl bg-sand p-4" data-testid="volume-helper">
              <input type="hidden" name="dimsUnit" value={dimUnit} />
              <Field label="Shape">
                <Select name="shape" value={shape} onChange={(e) => setShape(e.target.value as Shape)}>
                  <option value="round">Round</option>
                  <option value="square">Square</option>
                  <option value="rectangular">Rectangular</option>
                </Select>
              </Field>
              <p className="text-sm text-ink-soft">Measure inside the shell, in {inches ? "inches" : "centimetres"}, and the depth of the water (not the shell). Count the moulded seats and loungers: each takes up about {inches ? "26 US gallons" : "100 litres"} of water.</p>
              <div className="grid grid-cols-2 gap-3">
                {shape === "round" && <DimField label={`Inside diameter (${dimUnit})`} name="diameter" dims={dims} setDims={setDims} />}
                {shape === "square" && <DimField label={`Inside side (${dimUnit})`} name="side" dims={dims} setDims={setDims} />}
                {shape === "rectangular" && (
                  <>
                    <DimField label={`Inside length (${dimUnit})`} name="length" dims={dims} setDims={setDims} />
                    <DimField label={`Inside width (${dimUnit})`} name="width" dims={dims} setDims={setDims} />
                  </>
                )}
                <DimField label={`Water depth (${dimUnit})`} name="depth" dims={dims} setDims={setDims} />
                <DimField label="Seats and loungers" name="seats" dims={dims} setDims={setDims} />
              </div>
              {estimate !== null && estimateInUnit !== null && (
                <div className="flex flex-wrap items-center gap-3">
                  <p data-testid="volume-estimate">
                    About <strong>{estimateInUnit} {UNIT_WORDS[unit]}</strong>{dims.seats ? ", seats taken off" : ". Add the seats to take off the water they displace"}; the tub's manual gives the true figure.
                  </p>
                  <Button type="button" variant="secondary" onClick={() => setVolume(String(estimateInUnit))}>
                    Use this volume
                  </Button>
                </div>
              )}
              {estimateError && dims.depth && <p className="text-sm text-alert">{estimateError}</p>}
            </div>
          )}
        </div>
        <Field label="Sanitiser" error={errors?.sanitiser}>
          <Select name="sanitiser" defaultValue={initial.sanitiser}>
            <option value="chlorine">Chlorine</option>
            <option value="bromine">Bromine</option>
          </Select>
        </Field>
        <div className="grid grid-cols-[1fr_auto] items-end gap-3">
          <Field label="Running temperature" hint="The temperature the heater keeps; the water balance is worked out for it." error={errors?.setTemperature}>
            <Input name="setTemperature" inputMode="decimal" defaultValue={initial.setTemperature} />
          </Field>
          <label className="block">
            <span className="sr-only">Temperature unit</span>
            <Select name="temperatureUnit" defaultValue={initial.temperatureUnit} aria-label="Temperature unit">
              <option value="C">°C</option>
              <option value="F">°F</option>
            </Select>
          </label>
        </div>
        <Field label="Bathers per day" hint="On a usual day; it sets the drain-and-refill interval and the stabiliser forecast." error={errors?.bathersPerDay}>
          <Input name="bathersPerDay" inputMode="decimal" defaultValue={initial.bathersPerDay} />
        </Field>
        <Field label="Ranges follow" hint="Where published guidance differs, choose which one the plan follows; it says which." error={errors?.guidance}>
          <Select name="guidance" defaultValue={initial.guidance}>
            {Object.values(GUIDANCE).map((g) => (
              <option key={g.id} value={g.id}>
                {g.name}
              </option>
            ))}
          </Select>
        </Field>
        <Field label="Test strips in use" hint="The batch printed on your strip tub. It picks the colour chart Dipwell reads with." error={errors?.batchId}>
          <Select name="batchId" defaultValue={initial.batchId}>
            <option value="">I have not chosen yet</option>
            {batches.map((b) => (
              <option key={b.id} value={b.id}>
                {b.label}
              </option>
            ))}
          </Select>
        </Field>
        <input type="hidden" name="timeZone" value={initial.timeZone} />
      </Card>
      <Button type="submit" className="w-full sm:w-auto">
        {submitLabel}
      </Button>
    </Form>
  );
}

type Dims = { diameter: string; side: string; length: string; width: string; depth: string; seats: string };

function DimField({ label, name, dims, setDims }: { label: string; name: keyof Dims; dims: Dims; setDims: (d: Dims) => void }) {
  return (
    <Field label={label}>
      <Input name={name} inputMode="decimal" value={dims[name]} onChange={(e) => setDims({ ...dims, [name]: e.target.value })} />
    </Field>
  );
}
