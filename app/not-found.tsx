import Link from 'next/link';

export default function NotFound() {
  return (
    <main className="mx-auto grid max-w-xl grid-cols-[minmax(0,1fr)] gap-4 p-6">
      <h1 className="text-2xl font-bold">Not found</h1>
      <p>There is nothing here, or it belongs to another organisation.</p>
      <Link href="/" className="font-semibold text-spirit underline underline-offset-4">
        Back to the start page
      </Link>
    </main>
  );
}
