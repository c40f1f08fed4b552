// The decision-support caution (DOMAIN §5.1), shown on every clinical screen, near the data.
export function DecisionSupportCaution({ className = "" }: { className?: string }) {
  return (
    <aside
      aria-label="Decision-support caution"
      className={`flex items-start gap-3 rounded-md border-l-4 border-caution bg-caution-surface px-4 py-3 text-sm ${className}`}
    >
      <svg aria-hidden="true" viewBox="0 0 20 20" className="mt-0.5 h-5 w-5 shrink-0 text-caution">
        <circle cx="10" cy="10" r="8.5" fill="none" stroke="currentColor" strokeWidth="1.8" />
        <rect x="9" y="8.5" width="2" height="6" rx="1" fill="currentColor" />
        <circle cx="10" cy="5.8" r="1.2" fill="currentColor" />
      </svg>
      <p>
        <strong>Decision support only.</strong> Corvane does not diagnose and does not replace bedside monitor alarms,
        clinical assessment or your unit&apos;s protocols. The responsible clinician decides.
      </p>
    </aside>
  );
}
