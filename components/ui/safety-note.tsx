/** The caution shown wherever a machine is raised. Levelwire guides; it does not replace the builder or the law. */
export function SafetyNote({ collapsible = false }: { collapsible?: boolean }) {
  const points = (
    <ul className="mt-1 list-disc pl-5">
      <li>Keep hands and feet clear of pads and screws while turning; nobody under the machine.</li>
      <li>Isolate and lock out power before working inside the enclosure or on the axes.</li>
      <li>Never run a screw past its travel; lift in small steps.</li>
      <li>The machine builder&apos;s instructions, local codes and licensed practice govern; Levelwire only guides.</li>
    </ul>
  );
  const headline = <span className="font-bold">Several tonnes are resting on these screws.</span>;
  return (
    <aside role="note" aria-label="Safety" className="rounded-lg border-l-8 border-bubble bg-bubble/10 p-3 text-base leading-snug">
      {collapsible ? (
        <details open>
          <summary className="min-h-10 cursor-pointer content-center">
            {headline} <span className="text-ink-soft underline underline-offset-4">Cautions</span>
          </summary>
          {points}
        </details>
      ) : (
        <>
          <p>{headline}</p>
          {points}
        </>
      )}
    </aside>
  );
}
