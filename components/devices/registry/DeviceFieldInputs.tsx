"use client";
// The inputs of a device record, shared by the registration form and the edit form (the serial only when
// registering: it is the device's identity). Names match deviceFieldsSchema, so the server's field errors land here.
import { useRef, useState } from "react";
import { FieldError } from "@/components/FieldError";

export interface DeviceFieldValues {
  model: string;
  manufacturer: string;
  firmware: string;
  timestampResolutionMs: string;
  streamUrl: string;
  notes: string;
}

function Field({ id, label, hint, errors, children }: { id: string; label: string; hint?: React.ReactNode; errors?: string[]; children: React.ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="mb-1 block font-bold">{label}</label>
      {hint && <p id={`${id}-hint`} className="mb-1 text-sm text-muted">{hint}</p>}
      {children}
      <FieldError id={`${id}-error`} errors={errors} />
    </div>
  );
}

/** aria attributes linking an input to its hint and error. */
const described = (id: string, hint: boolean, errors?: string[]) => ({
  "aria-invalid": errors ? true : undefined,
  "aria-describedby": [hint ? `${id}-hint` : null, `${id}-error`].filter(Boolean).join(" "),
});

export function DeviceFieldInputs({ idPrefix, errorsFor, defaults, withSerial, simulatorPort }: {
  idPrefix: string;
  errorsFor: (name: string) => string[] | undefined;
  defaults?: DeviceFieldValues;
  /** Registration: the serial is entered, and the simulator address can be filled in from it. */
  withSerial?: boolean;
  simulatorPort?: number;
}) {
  const id = (name: string) => `${idPrefix}-${name}`;
  const serialRef = useRef<HTMLInputElement>(null);
  const urlRef = useRef<HTMLInputElement>(null);
  const [fillNote, setFillNote] = useState<string | null>(null);
  const fillSimulatorAddress = () => {
    const serial = serialRef.current?.value.trim().toUpperCase() ?? "";
    if (!serial) {
      setFillNote("Enter the serial number first: the address names it.");
      serialRef.current?.focus();
      return;
    }
    if (urlRef.current) urlRef.current.value = `http://127.0.0.1:${simulatorPort}/devices/${encodeURIComponent(serial)}/stream`;
    setFillNote("Filled in the simulator's address for this serial.");
  };
  return (
    <div className="grid gap-x-6 gap-y-4 md:grid-cols-2">
      {withSerial && (
        <Field id={id("serial")} label="Serial number" hint="As printed on the device label: letters, digits and dashes." errors={errorsFor("serial")}>
          <input ref={serialRef} id={id("serial")} name="serial" required maxLength={64} autoComplete="off" spellCheck={false}
            className="field-input font-mono uppercase" {...described(id("serial"), true, errorsFor("serial"))} />
        </Field>
      )}
      <Field id={id("manufacturer")} label="Manufacturer" errors={errorsFor("manufacturer")}>
        <input id={id("manufacturer")} name="manufacturer" required maxLength={120} defaultValue={defaults?.manufacturer}
          className="field-input" {...described(id("manufacturer"), false, errorsFor("manufacturer"))} />
      </Field>
      <Field id={id("model")} label="Model" errors={errorsFor("model")}>
        <input id={id("model")} name="model" required maxLength={120} defaultValue={defaults?.model}
          className="field-input" {...described(id("model"), false, errorsFor("model"))} />
      </Field>
      <Field id={id("firmware")} label="Firmware version" errors={errorsFor("firmware")}>
        <input id={id("firmware")} name="firmware" required maxLength={40} defaultValue={defaults?.firmware} spellCheck={false}
          className="field-input font-mono" {...described(id("firmware"), false, errorsFor("firmware"))} />
      </Field>
      <Field id={id("timestampResolutionMs")} label="RR resolution (ms)" hint="The tick of the device's beat clock: 1 for millisecond clocks, 7.8125 for 128 Hz." errors={errorsFor("timestampResolutionMs")}>
        <input id={id("timestampResolutionMs")} name="timestampResolutionMs" required inputMode="decimal" defaultValue={defaults?.timestampResolutionMs ?? "1"}
          className="field-input font-mono" {...described(id("timestampResolutionMs"), true, errorsFor("timestampResolutionMs"))} />
      </Field>
      <div className="md:col-span-2">
        <Field
          id={id("streamUrl")}
          label="Stream address"
          hint={
            <>
              Where Corvane reads the device&apos;s beat stream (http:// or https://).
              {simulatorPort !== undefined && (
                <> For the demo simulator: <code className="font-mono">http://127.0.0.1:{simulatorPort}/devices/&lt;SERIAL&gt;/stream</code>.</>
              )}
            </>
          }
          errors={errorsFor("streamUrl")}
        >
          <div className="flex flex-wrap gap-2">
            <input ref={urlRef} id={id("streamUrl")} name="streamUrl" type="url" required defaultValue={defaults?.streamUrl} spellCheck={false}
              className="field-input min-w-0 flex-1 font-mono" {...described(id("streamUrl"), true, errorsFor("streamUrl"))} />
            {withSerial && simulatorPort !== undefined && (
              <button type="button" className="btn-secondary" onClick={fillSimulatorAddress}>Use the simulator&apos;s address</button>
            )}
          </div>
          {withSerial && <p aria-live="polite" className="mt-1 text-sm text-muted">{fillNote}</p>}
        </Field>
      </div>
      <div className="md:col-span-2">
        <Field id={id("notes")} label="Notes (optional)" hint="Location, asset tag, anything a colleague should know. No patient details." errors={errorsFor("notes")}>
          <textarea id={id("notes")} name="notes" rows={3} maxLength={2000} defaultValue={defaults?.notes}
            className="field-input" {...described(id("notes"), true, errorsFor("notes"))} />
        </Field>
      </div>
    </div>
  );
}
