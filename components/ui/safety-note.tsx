/** The caution shown wherever a machine is raised. Levelwire guides; it does not replace the builder or the law. */
export function SafetyNote({ compact = false }: { compact?: boolean }) {
  return (
    <aside role="note" aria-label="Safety" className="rounded-lg border-l-8 border-bubble bg-bubble/10 p-4 text-base leading-snug">
      <p className="font-bold">Several tonnes are resting on these screws.</p>
      {!compact && (
        <ul className="mt-1 list-disc pl-5">
          <li>Keep hands and feet clear of pads and screws while turning; nobody under the machine.</li>
          <li>Isolate and lock out power before working inside the enclosure or on the axes.</li>
          <li>Never run a screw past its travel; lift in small steps.</li>
        </ul>
      )}
      <p className="mt-1 text-ink-soft">
        Levelwire guides the work. The machine builder&apos;s instructions, local codes and licensed practice govern.
      </p>
    </aside>
  );
}
