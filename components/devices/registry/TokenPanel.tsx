"use client";
// The device's stream token: its state and dates, and (for those who manage devices) issue, rotate with a grace
// period, revoke. A new token comes back in the action's answer once; this panel keeps it on screen until the person
// hides it or leaves, and never stores it anywhere else. The panel stays mounted while the page refreshes around
// it, so the token survives the refresh that shows its new state.
import { useEffect, useId, useRef, useState } from "react";
import { issueStreamToken, revokeStreamToken, rotateStreamToken, type NewTokenData } from "@/lib/devices/actions";
import type { TokenDTO } from "@/lib/devices/registry";
import { DEFAULT_GRACE_MINUTES, GRACE_CHOICES } from "@/lib/devices/registry.validation";
import { formatLocal } from "@/lib/time";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { ConfirmStep } from "./ConfirmStep";
import { CopyField } from "./CopyField";
import { TOKEN_STATE_WORDS } from "./token-words";

type Revealed = NewTokenData & { kind: "issued" | "rotated" };

// useActionState hands an action its previous answer, and a server action sends its arguments to the server: a
// second issue or rotation would send the earlier token back over the wire (and into the dev server's log). These
// client-side wrappers drop the previous answer, so a token travels once, server to browser.
const issueOnce = (_previous: unknown, form: FormData) => issueStreamToken(null, form);
const rotateOnce = (_previous: unknown, form: FormData) => rotateStreamToken(null, form);

function OneTimeToken({ revealed, serial, timeZone, onHide }: { revealed: Revealed; serial: string; timeZone: string; onHide: () => void }) {
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => headingRef.current?.focus(), [revealed]);
  return (
    <section aria-labelledby="one-time-token" className="space-y-3 rounded-md border-2 border-dashed border-caution bg-caution-surface p-4">
      <h3 id="one-time-token" ref={headingRef} tabIndex={-1} className="font-bold">
        New stream token for <span className="font-mono">{serial}</span> — shown once
      </h3>
      <p>
        <span className="font-bold">Copy it now.</span> Corvane keeps only a fingerprint of it and cannot show it again. Enter it in the
        device&apos;s stream settings.
        {revealed.kind === "rotated" &&
          (revealed.previousValidUntil
            ? ` The old token keeps working until ${formatLocal(revealed.previousValidUntil, timeZone)}.`
            : " The old token no longer works.")}
      </p>
      <CopyField label="Stream token" value={revealed.token} />
      {revealed.command && (
        <div>
          <CopyField label="Simulator command, with this token" value={revealed.command} multiline />
          <p className="text-sm text-muted">Run it from the Corvane project folder to have the demo simulator stand in for this device.</p>
        </div>
      )}
      <button type="button" className="btn-secondary" onClick={onHide}>I have copied it — hide the token</button>
    </section>
  );
}

type Form<R> = ReturnType<typeof useActionForm<R>>;

function Hidden({ unitId, deviceId }: { unitId: string; deviceId: string }) {
  return (
    <>
      <input type="hidden" name="unitId" value={unitId} />
      <input type="hidden" name="deviceId" value={deviceId} />
    </>
  );
}

function IssueForm({ unitId, deviceId, form }: { unitId: string; deviceId: string; form: Form<NewTokenData> }) {
  const { state, pending, onSubmit } = form;
  return (
    <form onSubmit={onSubmit} aria-label="Issue a stream token" className="space-y-2">
      <Hidden unitId={unitId} deviceId={deviceId} />
      {state && !state.ok && <Notice tone="problem">{state.message}</Notice>}
      <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Issuing…" : "Issue token"}</button>
    </form>
  );
}

function RotateForm({ unitId, deviceId, rotating, form }: { unitId: string; deviceId: string; rotating: boolean; form: Form<NewTokenData> }) {
  const { state, pending, onSubmit, errorsFor } = form;
  const id = useId();
  return (
    <form onSubmit={onSubmit} aria-label="Rotate the stream token" className="space-y-3">
      <Hidden unitId={unitId} deviceId={deviceId} />
      {state && !state.ok && <Notice tone="problem">{state.message}</Notice>}
      <div>
        <label htmlFor={`${id}-grace`} className="mb-1 block font-bold">Old token keeps working for</label>
        <select id={`${id}-grace`} name="graceMinutes" defaultValue={String(DEFAULT_GRACE_MINUTES)} className="field-input max-w-xs"
          aria-invalid={errorsFor("graceMinutes") ? true : undefined} aria-describedby={`${id}-grace-hint ${id}-grace-error`}>
          {GRACE_CHOICES.map((c) => <option key={c.minutes} value={c.minutes}>{c.label}</option>)}
        </select>
        <p id={`${id}-grace-hint`} className="mt-1 text-sm text-muted">Long enough to enter the new token in the device; the stream continues meanwhile.</p>
        <FieldError id={`${id}-grace-error`} errors={errorsFor("graceMinutes")} />
      </div>
      <ConfirmStep
        label="Rotate token…"
        confirmLabel="Rotate now"
        pending={pending}
        resetKey={state}
        question={
          <p>
            A new token becomes current and is shown once.
            {rotating && " The token still in its grace period from the last rotation stops working at once."}
          </p>
        }
      />
    </form>
  );
}

function RevokeForm({ unitId, deviceId, form }: { unitId: string; deviceId: string; form: Form<undefined> }) {
  const { state, pending, onSubmit } = form;
  return (
    <form onSubmit={onSubmit} aria-label="Revoke the stream token" className="space-y-2">
      <Hidden unitId={unitId} deviceId={deviceId} />
      {state && !state.ok && <Notice tone="problem">{state.message}</Notice>}
      <ConfirmStep
        label="Revoke token…"
        confirmLabel="Revoke now"
        pending={pending}
        resetKey={state}
        question={<p>Every token of this device stops working at once, and Corvane stops reading its stream until a new token is issued.</p>}
      />
    </form>
  );
}

export function TokenPanel({ unitId, deviceId, serial, timeZone, token, canManage, decommissioned, placeholderCommand, demoSimulator }: {
  unitId: string;
  deviceId: string;
  serial: string;
  timeZone: string;
  token: TokenDTO;
  canManage: boolean;
  decommissioned: boolean;
  /** The simulator command with a `<token>` placeholder, when the stream address is the simulator's. */
  placeholderCommand: string | null;
  /** The device is one the demo simulator of `npm start` serves. */
  demoSimulator: boolean;
}) {
  // The forms' answers live here, in the panel that stays mounted: the form that asked may be gone after the refresh
  // (the Issue form is replaced by Rotate once a token exists), its answer must not be.
  const issue = useActionForm(issueOnce);
  const rotate = useActionForm(rotateOnce);
  const revoke = useActionForm(revokeStreamToken);
  const [revealed, setRevealed] = useState<Revealed | null>(null);
  const [done, setDone] = useState<string | null>(null);
  useEffect(() => {
    if (issue.state?.ok && issue.state.data) {
      setRevealed({ ...issue.state.data, kind: "issued" });
      setDone(null);
    }
  }, [issue.state]);
  useEffect(() => {
    if (rotate.state?.ok && rotate.state.data) {
      setRevealed({ ...rotate.state.data, kind: "rotated" });
      setDone(null);
    }
  }, [rotate.state]);
  useEffect(() => {
    if (!revoke.state?.ok) return;
    setRevealed(null);
    setDone(revoke.state.message);
  }, [revoke.state]);
  const hasToken = token.state === "issued" || token.state === "rotating";
  return (
    <section aria-labelledby="token-heading" className="card space-y-4 p-5">
      <h2 id="token-heading">Stream token</h2>
      <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1">
        <dt className="text-muted">State</dt>
        <dd className="font-bold">{TOKEN_STATE_WORDS[token.state]}</dd>
        {token.issuedAt && (
          <>
            <dt className="text-muted">Issued</dt>
            <dd><time dateTime={token.issuedAt}>{formatLocal(token.issuedAt, timeZone)}</time></dd>
          </>
        )}
        {token.previousValidUntil && (
          <>
            <dt className="text-muted">Old token works until</dt>
            <dd><time dateTime={token.previousValidUntil}>{formatLocal(token.previousValidUntil, timeZone)}</time></dd>
          </>
        )}
        {token.revokedAt && (
          <>
            <dt className="text-muted">Revoked</dt>
            <dd><time dateTime={token.revokedAt}>{formatLocal(token.revokedAt, timeZone)}</time></dd>
          </>
        )}
      </dl>
      <p className="text-muted">
        {token.state === "none" && "Corvane reads a device's stream only with a token. Issue one, then enter it in the device's stream settings."}
        {token.state === "issued" && "Corvane presents this token when it reads the stream. Rotate it to change it without a gap; revoke it to stop the stream at once."}
        {token.state === "rotating" && "A new token is current; the old one keeps working until the time above, so the device can be reconfigured without a gap."}
        {token.state === "revoked" && !decommissioned && "Corvane does not read this device's stream until a new token is issued."}
        {decommissioned && "This device is decommissioned: its tokens were revoked and it gets no new one."}
      </p>
      <div aria-live="polite">{done && <Notice tone="fine">{done}</Notice>}</div>
      {revealed && <OneTimeToken revealed={revealed} serial={serial} timeZone={timeZone} onHide={() => setRevealed(null)} />}
      {canManage && !decommissioned && (
        <div className="flex flex-wrap items-start gap-x-10 gap-y-5 border-t border-line pt-4">
          {!hasToken && <IssueForm unitId={unitId} deviceId={deviceId} form={issue} />}
          {hasToken && <RotateForm unitId={unitId} deviceId={deviceId} rotating={token.state === "rotating"} form={rotate} />}
          {hasToken && <RevokeForm unitId={unitId} deviceId={deviceId} form={revoke} />}
        </div>
      )}
      {demoSimulator && !decommissioned && (
        <div className="border-t border-line pt-4">
          <h3 className="mb-2 font-bold">Demo simulator</h3>
          <p className="text-sm text-muted">
            The demo simulator that <code className="font-mono">npm start</code> runs serves this device. It takes a token
            issued or rotated here within 10 seconds, as if it had been entered on the monitor, so the stream goes on with
            the new token without a restart.
          </p>
        </div>
      )}
      {placeholderCommand && !decommissioned && (
        <div className="border-t border-line pt-4">
          <h3 className="mb-2 font-bold">Demo simulator</h3>
          <CopyField label="Simulator command" value={placeholderCommand} multiline />
          <p className="text-sm text-muted">
            Its stream address is the simulator&apos;s. Run this from the Corvane project folder with <code className="font-mono">&lt;token&gt;</code> replaced
            by the token shown when you issue or rotate it (the panel that shows the token has the full command).
          </p>
        </div>
      )}
    </section>
  );
}
