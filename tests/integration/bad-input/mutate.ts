// Malformed payloads made from a valid one: each case changes one thing and says which field it broke, so the
// server's answer can be checked for naming that field. Whether a case is really invalid is decided by the caller
// (the route's own schema is the judge of what is valid, never of which field is named).
import fc from 'fast-check';

export type Path = (string | number)[];

/** A value nested `depth` deep, written out as JSON text only when sent (a JS value that deep is costly to build twice). */
export class DeepNest {
  constructor(
    readonly depth: number,
    readonly shape: 'array' | 'object',
  ) {}
  text(): string {
    return this.shape === 'array' ? `${'['.repeat(this.depth)}${']'.repeat(this.depth)}` : `${'{"a":'.repeat(this.depth)}1${'}'.repeat(this.depth)}`;
  }
  value(): unknown {
    let v: unknown = this.shape === 'array' ? [] : 1;
    for (let i = this.depth - (this.shape === 'array' ? 1 : 0); i > 0; i -= 1) v = this.shape === 'array' ? [v] : { a: v };
    return v;
  }
}

/** One malformed payload: the value (possibly holding a DeepNest), and the dotted field at fault, if one field is. */
export type Case = {
  what: string;
  value: unknown;
  /** The field the error must name; `undefined` when the payload as a whole is at fault. */
  field: string | undefined;
  /** Text a schema may let through but the database cannot store (a NUL character, year 0000): refused all the same. */
  hostile?: 'nul' | 'year-0';
};

/** A case as it goes over the wire: fast-check prints this short form instead of a 100,000-character string. */
export function withSummary<T extends { what: string }>(c: T): T {
  const copy = { ...c };
  Object.defineProperty(copy, fc.toStringMethod, { value: () => c.what, enumerable: false });
  return copy;
}

/** JSON text of a value, with any DeepNest written out in place. */
export function jsonText(value: unknown): string {
  const nests: DeepNest[] = [];
  const text = JSON.stringify(value, (_k, v: unknown) => {
    if (v instanceof DeepNest) {
      nests.push(v);
      return `\u0000deep${nests.length - 1}\u0000`;
    }
    return v;
  });
  return nests.reduce((t, n, i) => t.replace(`"\\u0000deep${i}\\u0000"`, n.text()), text ?? 'null');
}

/** The value with every DeepNest built out (what a socket sends, and what a schema is asked about). */
export function materialise(value: unknown): unknown {
  if (value instanceof DeepNest) return value.value();
  if (Array.isArray(value)) return value.map(materialise);
  if (value && typeof value === 'object' && !(value instanceof Uint8Array)) {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) Object.defineProperty(out, k, { value: materialise(v), enumerable: true, writable: true, configurable: true });
    return out;
  }
  return value;
}

const dotted = (p: Path) => p.map(String).join('.');
const short = (v: unknown) => {
  if (v instanceof DeepNest) return `${v.shape} nested ${v.depth} deep`;
  if (typeof v === 'string' && v.length > 40) return `a ${v.length}-character string`;
  if (v instanceof Uint8Array) return `${v.byteLength} binary bytes`;
  const s = JSON.stringify(v);
  return s === undefined ? String(v) : s.length > 60 ? `${s.slice(0, 60)}…` : s;
};

/** Every path in a JSON value, the root ([]) first; `objectsOnly` keeps the paths of objects. */
export function pathsOf(value: unknown, objectsOnly = false, at: Path = []): Path[] {
  const isObject = value !== null && typeof value === 'object' && !Array.isArray(value);
  const own = !objectsOnly || isObject ? [at] : [];
  if (Array.isArray(value)) return [...own, ...value.flatMap((v, i) => pathsOf(v, objectsOnly, [...at, i]))];
  if (isObject) return [...own, ...Object.entries(value as object).flatMap(([k, v]) => pathsOf(v, objectsOnly, [...at, k]))];
  return own;
}

function getAt(value: unknown, p: Path): unknown {
  return p.reduce<unknown>((v, k) => (v as Record<string | number, unknown>)[k], value);
}

/** A deep copy with the node at `p` replaced (or, with `drop`, its key removed). Keys are defined, never assigned (`__proto__`). */
function setAt(value: unknown, p: Path, next: unknown, drop = false): unknown {
  if (p.length === 0) return next;
  const [head, ...rest] = p;
  if (Array.isArray(value)) return value.map((v, i) => (i === head ? setAt(v, rest, next, drop) : v));
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(value as object)) {
    if (k === String(head)) {
      if (!(drop && rest.length === 0)) Object.defineProperty(out, k, { value: setAt(v, rest, next, drop), enumerable: true, writable: true, configurable: true });
    } else Object.defineProperty(out, k, { value: v, enumerable: true, writable: true, configurable: true });
  }
  return out;
}

function addKey(value: unknown, p: Path, key: string, extra: unknown): unknown {
  const target = getAt(value, p) as Record<string, unknown>;
  const grown: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(target)) Object.defineProperty(grown, k, { value: v, enumerable: true, writable: true, configurable: true });
  Object.defineProperty(grown, key, { value: extra, enumerable: true, writable: true, configurable: true });
  return setAt(value, p, grown);
}

/** Strings that are numbers to a careless parser, or nothing at all. */
export const NUMBERISH_STRINGS = ['NaN', 'Infinity', '-Infinity', '1e999', '-1e999', '0x1F', '1_000', '', ' ', '12abc', '−5', 'null', 'true', 'undefined'];

/** Numbers of the right type that no Levelwire field accepts, or that test a range's edge. */
export const EDGE_NUMBERS = [1e308, -1e308, 1e20, -1e20, Number.MAX_SAFE_INTEGER + 2, -1, 0, 0.5, -0.5, 1e-300, 4.000000000000001];

export const hugeString = fc
  .record({ unit: fc.string({ minLength: 1, maxLength: 8, unit: 'grapheme' }), length: fc.integer({ min: 5_000, max: 120_000 }) })
  .map(({ unit, length }) => unit.repeat(Math.ceil(length / unit.length)).slice(0, length));

export const deepNest = fc.record({ depth: fc.integer({ min: 20, max: 5_000 }), shape: fc.constantFrom('array' as const, 'object' as const) }).map(({ depth, shape }) => new DeepNest(depth, shape));

/** Values of every JSON type, some of them awkward. */
export const junkValue: fc.Arbitrary<unknown> = fc.oneof(
  fc.string({ maxLength: 24, unit: 'grapheme' }),
  fc.constantFrom(...NUMBERISH_STRINGS, '\u0000', '💥'.repeat(3), '<script>alert(1)</script>', "'; drop table machines; --", '../../etc/passwd', '%00', '\u202e'),
  fc.integer(),
  fc.double(),
  fc.constantFrom(...EDGE_NUMBERS),
  fc.boolean(),
  fc.constant(null),
  fc.constant({}),
  fc.constant([]),
  fc.array(fc.oneof(fc.integer(), fc.string({ maxLength: 5 })), { maxLength: 3 }),
  fc.dictionary(fc.string({ minLength: 1, maxLength: 6 }), fc.integer(), { maxKeys: 3 }),
  hugeString,
  deepNest,
);

/** Keys no schema knows, some of them hostile to a careless merge. */
export const extraKey = fc.oneof(
  { weight: 4, arbitrary: fc.string({ minLength: 1, maxLength: 16, unit: 'grapheme' }) },
  { weight: 1, arbitrary: fc.constantFrom('__proto__', 'constructor', 'prototype', 'organisationId', 'role', 'seq', 'actorId', 'id ') },
);

/**
 * Malformed variants of `valid`, one fault each: a field dropped, of the wrong type, out of range, a huge string,
 * deeply nested, wrapped in an array, an unknown key added; or the whole payload replaced.
 */
export function mutationsOf(valid: unknown, opts: { extra?: unknown[]; junk?: fc.Arbitrary<unknown> } = {}): fc.Arbitrary<Case> {
  const junk = opts.junk ? fc.oneof({ weight: 6, arbitrary: junkValue }, { weight: 1, arbitrary: opts.junk }) : junkValue;
  const paths = pathsOf(valid).filter((p) => p.length > 0);
  const objectPaths = pathsOf(valid, true);
  const at = paths.length > 0 ? fc.constantFrom(...paths) : fc.constant<Path>([]);
  const fieldEdits: fc.Arbitrary<Case>[] = [];
  if (paths.length > 0) {
    fieldEdits.push(
      at.map((p) => {
        const parentIsArray = Array.isArray(getAt(valid, p.slice(0, -1)));
        return parentIsArray
          ? { what: `${dotted(p)} set to null`, value: setAt(valid, p, null), field: dotted(p) }
          : { what: `${dotted(p)} dropped`, value: setAt(valid, p, undefined, true), field: dotted(p) };
      }),
      fc.tuple(at, junk).map(([p, v]) => ({ what: `${dotted(p)} = ${short(v)}`, value: setAt(valid, p, v), field: dotted(p) })),
      fc.tuple(at, fc.constantFrom(...EDGE_NUMBERS, ...NUMBERISH_STRINGS)).map(([p, v]) => ({ what: `${dotted(p)} = ${short(v)}`, value: setAt(valid, p, v), field: dotted(p) })),
      fc.tuple(at, hugeString).map(([p, v]) => ({ what: `${dotted(p)} = ${short(v)}`, value: setAt(valid, p, v), field: dotted(p) })),
      fc.tuple(at, deepNest).map(([p, v]) => ({ what: `${dotted(p)} = ${short(v)}`, value: setAt(valid, p, v), field: dotted(p) })),
      at.map((p) => ({ what: `${dotted(p)} wrapped in an array`, value: setAt(valid, p, [getAt(valid, p)]), field: dotted(p) })),
    );
  }
  const textPaths = paths.filter((p) => typeof getAt(valid, p) === 'string');
  if (textPaths.length > 0) {
    fieldEdits.push(
      fc.tuple(fc.constantFrom(...textPaths), fc.nat()).map(([p, n]) => {
        const text = getAt(valid, p) as string;
        const at = n % (text.length + 1);
        return { what: `${dotted(p)} holds a NUL character`, value: setAt(valid, p, `${text.slice(0, at)}\u0000${text.slice(at)}`), field: dotted(p), hostile: 'nul' as const };
      }),
    );
  }
  // A date or time in year 0000 reads fine in JavaScript, but PostgreSQL has no year 0.
  const datePaths = textPaths.filter((p) => /^\d{4}-\d{2}-\d{2}/.test(getAt(valid, p) as string));
  if (datePaths.length > 0) {
    fieldEdits.push(
      fc.constantFrom(...datePaths).map((p) => ({ what: `${dotted(p)} in year 0000`, value: setAt(valid, p, `0000${(getAt(valid, p) as string).slice(4)}`), field: dotted(p), hostile: 'year-0' as const })),
    );
  }
  if (objectPaths.length > 0) {
    fieldEdits.push(
      fc.tuple(fc.constantFrom(...objectPaths), extraKey, junk).map(([p, k, v]) => {
        const field = dotted([...p, k]);
        return { what: `unknown key ${JSON.stringify(k)} added at ${dotted(p) || 'the top'}`, value: addKey(valid, p, k, v), field };
      }),
    );
  }
  const whole: fc.Arbitrary<Case> = fc.oneof(
    fc.constantFrom<unknown>(null, true, 0, 'text', [], ...(opts.extra ?? [])).map((v) => ({ what: `the payload replaced by ${short(v)}`, value: v, field: undefined })),
    fc.constant({ what: 'the payload wrapped in an array', value: [valid], field: undefined }),
    deepNest.map((v) => ({ what: `the payload replaced by ${short(v)}`, value: v, field: undefined })),
    hugeString.map((v) => ({ what: `the payload replaced by ${short(v)}`, value: v, field: undefined })),
  );
  return fc.oneof({ weight: 6, arbitrary: fc.oneof(...fieldEdits) }, { weight: 1, arbitrary: whole }).map(withSummary);
}

/** Bodies that are not JSON at all (or not what a JSON route reads), each with the content type it is sent under. */
export function nonJsonBodies(valid: unknown): fc.Arbitrary<{ what: string; text: string | Uint8Array; contentType: string | undefined }> {
  const json = JSON.stringify(valid);
  return fc
    .oneof(
      fc.constant({ what: 'an empty body', text: '', contentType: 'application/json' }),
      fc.integer({ min: 1, max: Math.max(1, json.length - 1) }).map((n) => ({ what: `the JSON cut after ${n} characters`, text: json.slice(0, n), contentType: 'application/json' })),
      fc.constantFrom('{"a": NaN}', '{"a": Infinity}', "{'single': 'quotes'}", '{"a":1,}', '[1,2', '\u0000', 'undefined', '{"a":1}{"b":2}', '// comment\n{}').map((text) => ({
        what: `not JSON: ${text}`,
        text,
        contentType: 'application/json',
      })),
      fc
        .string({ minLength: 1, maxLength: 80, unit: 'grapheme' })
        .filter((s) => {
          try {
            JSON.parse(s);
            return false;
          } catch {
            return true;
          }
        })
        .map((text) => ({ what: `not JSON: ${JSON.stringify(text)}`, text, contentType: 'text/plain' })),
      fc.uint8Array({ minLength: 1, maxLength: 256 }).map((bytes) => ({ what: `${bytes.length} random bytes`, text: bytes, contentType: 'application/octet-stream' })),
      fc.constant({
        what: 'a multipart form',
        text: '--junk\r\ncontent-disposition: form-data; name="a"\r\n\r\n1\r\n--junk--\r\n',
        contentType: 'multipart/form-data; boundary=junk',
      }),
      fc.constant({ what: 'a url-encoded form', text: new URLSearchParams({ a: '1', b: json }).toString(), contentType: 'application/x-www-form-urlencoded' }),
      fc.constant({ what: 'XML', text: '<?xml version="1.0"?><a>1</a>', contentType: 'application/xml' }),
    )
    .map(withSummary);
}

/** The content types a JSON body is sent under: the right one, and others a careless client sends. */
export const contentTypes = fc.constantFrom<string | undefined>(
  'application/json',
  'application/json; charset=utf-8',
  'text/plain;charset=UTF-8',
  'application/x-www-form-urlencoded',
  'multipart/form-data; boundary=x',
  'application/xml',
  undefined,
);

/** Ids that are not UUIDs: a real one damaged, or any text. Segments that would name another route are left out. */
export function malformedIds(reserved: readonly string[] = []): fc.Arbitrary<string> {
  const uuid = fc.uuid();
  return fc
    .oneof(
      uuid.chain((u) => fc.integer({ min: 0, max: u.length - 1 }).map((i) => u.slice(0, i) + u.slice(i + 1))),
      uuid.chain((u) => fc.tuple(fc.integer({ min: 0, max: u.length - 1 }), fc.constantFrom('g', 'z', 'G', ' ', '-', '_', 'é', '%')).map(([i, c]) => u.slice(0, i) + c + u.slice(i + 1))),
      uuid.map((u) => `${u}0`),
      uuid.map((u) => `{${u}}`),
      uuid.map((u) => u.replaceAll('-', '')),
      uuid.map((u) => `urn:uuid:${u}`),
      uuid.map((u) => ` ${u}`),
      uuid.map((u) => `${u};drop table machines`),
      fc.constantFrom('0', '-1', 'null', 'undefined', 'NaN', '1e999', '%', '%zz', '\u0000', "' or 1=1 --", 'x'.repeat(5_000)),
      fc.string({ minLength: 1, maxLength: 60, unit: 'grapheme' }),
    )
    .filter((s) => s.trim() !== '' && s !== '.' && s !== '..' && !reserved.includes(s));
}
