import type * as z from 'zod/mini';
import type { $ZodError } from 'zod/v4/core';

type Commands = typeof import('@/lib/session/commands');
type SchemaName = 'levelReadingInput' | 'reversalReadingInput' | 'heightReadingInput' | 'sweepReadingInput' | 'moveAnswer' | 'notePost';
export type Checked<T> = { success: true; data: T } | { success: false; error: $ZodError };

let loading: Promise<Commands> | undefined;

/**
 * The shared command schemas, and zod with them, load apart from the field view's first paint (about a tenth of
 * its JavaScript): the view asks for them as soon as it is up (field-view.tsx), before its service worker caches
 * what the page loaded, so they are there offline too. A failed load is tried again at the next check.
 */
export function loadCommandSchemas(): Promise<Commands> {
  loading ??= import('@/lib/session/commands').catch((err: unknown) => {
    loading = undefined;
    throw err;
  });
  return loading;
}

/**
 * Checks what a form built against one of the shared schemas. Should the schemas be out of reach (offline before
 * they were ever cached), the input goes on unchecked: the server checks every command again and the view shows a
 * refusal by its field, so nothing typed is lost for want of the check.
 */
export async function checkCommand<K extends SchemaName>(name: K, input: z.input<Commands[K]>): Promise<Checked<z.output<Commands[K]>>> {
  let schemas: Commands;
  try {
    schemas = await loadCommandSchemas();
  } catch {
    return { success: true, data: input as z.output<Commands[K]> };
  }
  return (schemas[name] as z.ZodMiniType).safeParse(input) as Checked<z.output<Commands[K]>>;
}
