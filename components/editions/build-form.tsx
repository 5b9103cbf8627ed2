"use client";

import { useRouter } from "next/navigation";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { useFormSend } from "@/components/ui/use-form-send";

/** Start a new edition build: cell size, extent and the two kriging settings a moderator may change. */
export function BuildForm() {
  const router = useRouter();
  const { pending, message, send, fieldErrors } = useFormSend<{ editionId: string }>();
  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const num = (k: string) => Number(f.get(k));
    const ok = await send("/api/editions/builds", {
      resolutionDeg: num("resolutionDeg"),
      west: num("west"),
      south: num("south"),
      east: num("east"),
      north: num("north"),
      extrapolationKm: num("extrapolationKm"),
      maxNeighbors: num("maxNeighbors"),
    });
    if (ok) router.refresh();
  }
  const extentErr = fieldErrors("grid.extent");
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4" aria-label="Start a new edition build" data-testid="build-form">
      <div className="grid gap-4 sm:grid-cols-3">
        <Field label="Cell size (degrees)" name="resolutionDeg" type="number" step="any" min="0.05" max="10" defaultValue="0.25" required errors={fieldErrors("resolutionDeg") ?? fieldErrors("grid.resolutionDeg")} hint="0.25° is the global default; coarser cells build faster." />
        <Field label="Extrapolation beyond (km)" name="extrapolationKm" type="number" step="any" min="1" max="20000" defaultValue="1000" required errors={fieldErrors("extrapolationKm")} hint="Cells farther than this from the nearest station are marked." />
        <Field label="Neighbouring stations per cell" name="maxNeighbors" type="number" step="1" min="4" max="200" defaultValue="24" required errors={fieldErrors("maxNeighbors")} />
      </div>
      <fieldset className="grid gap-4 sm:grid-cols-4">
        <legend className="mb-2 text-sm font-medium text-ink-900">Extent (degrees; the whole globe by default)</legend>
        <Field label="West" name="west" type="number" step="any" min="-180" max="180" defaultValue="-180" required errors={fieldErrors("west")} />
        <Field label="South" name="south" type="number" step="any" min="-90" max="90" defaultValue="-90" required errors={fieldErrors("south")} />
        <Field label="East" name="east" type="number" step="any" min="-180" max="180" defaultValue="180" required errors={fieldErrors("east")} />
        <Field label="North" name="north" type="number" step="any" min="-90" max="90" defaultValue="90" required errors={fieldErrors("north")} />
      </fieldset>
      {extentErr ? <p className="text-sm text-severity-fail">{extentErr.join(" ")}</p> : null}
      {message ? <Alert tone="error">{message}</Alert> : null}
      <div>
        <Button type="submit" disabled={pending}>
          {pending ? "Starting …" : "Start build"}
        </Button>
      </div>
    </form>
  );
}
