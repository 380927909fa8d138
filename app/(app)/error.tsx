'use client';

import { Button } from '@/components/ui/button';

export default function AppError({ reset }: { error: Error; reset: () => void }) {
  return (
    <main className="mx-auto grid max-w-xl grid-cols-[minmax(0,1fr)] gap-4 p-6">
      <h1 className="text-2xl font-bold">This screen hit a problem</h1>
      <p>Nothing you entered before this message was lost: stored readings stay stored. Try again, or reload the page.</p>
      <Button onClick={reset}>Try again</Button>
    </main>
  );
}
