export default function Loading() {
  return <p className="p-6 text-lg text-ink-soft">Loading…</p>;
}
