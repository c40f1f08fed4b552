"use client";
// The chain check form and its answer in words: intact (how many entries, checkpoints, uncovered newest entries),
// the first broken link (with expected and found hash and a link to the entry), or the first checkpoint that does
// not agree. The answer is announced (aria-live) and carries an icon and a word, never colour alone.
import Link from "next/link";
import { useState } from "react";
import { verifyAuditChain } from "@/lib/audit/actions";
import type { CheckpointFailure } from "@/lib/audit/checkpoints";
import type { ChainBreak, ChainVerification } from "@/lib/audit/verify";
import { formatLocalPrecise } from "@/lib/time";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";

interface UnitChoice {
  id: string;
  name: string;
  timeZone: string;
}

const count = (n: number | string) => BigInt(n).toLocaleString("en-US");
const plural = (n: number, one: string, many: string) => `${count(n)} ${n === 1 ? one : many}`;
const prev = (seq: string) => (BigInt(seq) - 1n).toString();

function Hash({ value }: { value: string }) {
  return <code className="break-all font-mono text-xs">{value}</code>;
}

function EntryLink({ seq }: { seq: string }) {
  return <Link href={`/audit/${seq}`}>Open entry #{count(seq)}</Link>;
}

function BrokenLink({ b }: { b: ChainBreak }) {
  let what: React.ReactNode;
  if (b.reason === "hash_mismatch") {
    what = <>its hash does not match its contents (expected <Hash value={b.expectedHash!} />, found <Hash value={b.foundHash!} />).</>;
  } else if (b.reason === "prev_hash_mismatch") {
    what = b.expectedHash === null
      ? <>the entry before it, #{count(prev(b.seq))}, is missing.</>
      : <>it does not link to entry #{count(prev(b.seq))} (expected <Hash value={b.expectedHash} />, found <Hash value={b.foundHash!} />).</>;
  } else {
    const last = prev(b.seq);
    what = last === b.expectedSeq
      ? <>entry #{count(b.expectedSeq!)} before it is missing.</>
      : <>entries #{count(b.expectedSeq!)} to #{count(last)} before it are missing.</>;
  }
  return <>Broken at entry #{count(b.seq)}: {what}</>;
}

function CheckpointProblem({ f, zone }: { f: CheckpointFailure; zone: string }) {
  const which = <>The signed checkpoint of {formatLocalPrecise(f.createdAt, zone)} (number {f.id}, covering up to entry #{count(f.seq)})</>;
  switch (f.reason) {
    case "row_missing":
      return <>{which} names an entry that is no longer in the trail: entries have been removed from it (from its end, if the chain itself is intact).</>;
    case "hash_differs":
      return <>{which} signed another hash for that entry than the one it has now (signed <Hash value={f.signedHash} />, found <Hash value={f.foundHash!} />): the trail was rewritten up to there.</>;
    case "signature_invalid":
      return <>{which} has a signature that does not match its contents: the checkpoint itself was altered or forged.</>;
    case "unknown_key":
      return <>{which} was signed with a key this server does not hold: the server secret has changed since, or the checkpoint was forged.</>;
  }
}

function Answer({ r, zone }: { r: ChainVerification; zone: string }) {
  const cp = r.checkpoints;
  if (r.ok && r.checked === 0) return <Notice tone="info">No entries in that range.</Notice>;
  const agreeing = cp.agreeing === 0 ? "no signed checkpoint in this range yet" : `${plural(cp.agreeing, "signed checkpoint agrees", "signed checkpoints agree")}`;
  const uncovered =
    r.uncovered === 0
      ? "every entry is covered by a checkpoint"
      : r.reachesNewest
        ? `${plural(r.uncovered, "newest entry", "newest entries")} not yet covered by a checkpoint`
        : `${plural(r.uncovered, "entry at the end of the range comes", "entries at the end of the range come")} after its last checkpoint`;
  return (
    <div className="space-y-3">
      {r.firstBroken ? (
        <Notice tone="problem">
          <p><BrokenLink b={r.firstBroken} /></p>
          <p className="mt-1">
            {r.checked > 0 ? `${plural(r.checked, "entry", "entries")} before it link correctly (from #${count(r.fromSeq!)}). ` : ""}
            <EntryLink seq={r.firstBroken.seq} />
          </p>
        </Notice>
      ) : (
        <Notice tone={r.ok ? "fine" : "info"}>
          Chain intact: {plural(r.checked, "entry", "entries")} checked from #{count(r.fromSeq!)} to #{count(r.toSeq!)}
          {cp.firstFailure ? "." : `; ${agreeing}; ${uncovered}.`}
        </Notice>
      )}
      {cp.firstFailure && (
        <Notice tone="problem">
          <p><CheckpointProblem f={cp.firstFailure} zone={zone} /></p>
          {cp.agreeing > 0 && <p className="mt-1">{plural(cp.agreeing, "earlier checkpoint agrees", "earlier checkpoints agree")}.</p>}
          {cp.firstFailure.reason === "hash_differs" && <p className="mt-1"><EntryLink seq={cp.firstFailure.seq} /></p>}
        </Notice>
      )}
    </div>
  );
}

export function ChainCheckFields({ units }: { units: UnitChoice[] }) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm<ChainVerification>(verifyAuditChain);
  const [by, setBy] = useState<"seq" | "time">("seq");
  const [unitId, setUnitId] = useState(units[0]?.id ?? "");
  const zone = units.find((u) => u.id === unitId)?.timeZone ?? "UTC";
  const invalid = (name: string) => (errorsFor(name) ? true : undefined);
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-3" noValidate>
      {units.length > 0 && (
        <fieldset>
          <legend className="mb-1 font-bold">Range by</legend>
          <div className="flex flex-wrap gap-x-6 gap-y-2">
            <label className="flex items-center gap-2">
              <input type="radio" name="by" value="seq" checked={by === "seq"} onChange={() => setBy("seq")} /> Entry numbers
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="by" value="time" checked={by === "time"} onChange={() => setBy("time")} /> Date and time
            </label>
          </div>
        </fieldset>
      )}
      {/* The inactive range's fields stay in place (values kept) but disabled, so they are not sent. */}
      <fieldset disabled={by !== "seq"} hidden={by !== "seq"} className="flex flex-wrap items-end gap-4">
        <legend className="sr-only">Entry numbers</legend>
        <div>
          <label htmlFor="fromSeq" className="mb-1 block font-bold">From entry</label>
          <input id="fromSeq" name="fromSeq" inputMode="numeric" className="field-input w-36" placeholder="first"
            aria-invalid={invalid("fromSeq")} aria-describedby="fromSeq-error" />
        </div>
        <div>
          <label htmlFor="toSeq" className="mb-1 block font-bold">To entry</label>
          <input id="toSeq" name="toSeq" inputMode="numeric" className="field-input w-36" placeholder="last"
            aria-invalid={invalid("toSeq")} aria-describedby="toSeq-error" />
        </div>
      </fieldset>
      <fieldset disabled={by !== "time"} hidden={by !== "time"} className="space-y-2">
        <legend className="sr-only">Date and time</legend>
        <div className="flex flex-wrap items-end gap-4">
          {units.length > 1 ? (
            <div>
              <label htmlFor="unitId" className="mb-1 block font-bold">Times on the clock of</label>
              <select id="unitId" name="unitId" className="field-input w-56" value={unitId} onChange={(e) => setUnitId(e.target.value)}
                aria-invalid={invalid("unitId")} aria-describedby="unitId-error">
                {units.map((u) => <option key={u.id} value={u.id}>{u.name} ({u.timeZone})</option>)}
              </select>
            </div>
          ) : (
            <input type="hidden" name="unitId" value={unitId} />
          )}
          <div>
            <label htmlFor="fromTime" className="mb-1 block font-bold">From</label>
            <input id="fromTime" name="fromTime" type="datetime-local" className="field-input w-56"
              aria-invalid={invalid("fromTime")} aria-describedby="fromTime-error range-hint" />
          </div>
          <div>
            <label htmlFor="toTime" className="mb-1 block font-bold">Until</label>
            <input id="toTime" name="toTime" type="datetime-local" className="field-input w-56"
              aria-invalid={invalid("toTime")} aria-describedby="toTime-error range-hint" />
          </div>
        </div>
        <p id="range-hint" className="text-sm text-muted">Local time in {zone}; entries from the first time up to, not including, the second.</p>
      </fieldset>
      <div>
        <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Checking…" : "Check the chain"}</button>
      </div>
      <FieldError id="fromSeq-error" errors={errorsFor("fromSeq")} />
      <FieldError id="toSeq-error" errors={errorsFor("toSeq")} />
      <FieldError id="unitId-error" errors={errorsFor("unitId")} />
      <FieldError id="fromTime-error" errors={errorsFor("fromTime")} />
      <FieldError id="toTime-error" errors={errorsFor("toTime")} />
      <div aria-live="polite">
        {state && (state.ok && state.data ? <Answer r={state.data} zone={zone} /> : !state.ok && !state.fieldErrors && <Notice tone="problem">{state.message}</Notice>)}
      </div>
    </form>
  );
}
