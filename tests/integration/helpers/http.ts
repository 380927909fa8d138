import { PASSWORD } from './fixtures';

export const APP_URL = process.env.APP_URL ?? 'http://127.0.0.1:3100';

/** Signs in through next-auth's credentials flow over HTTP, as a browser would; returns the cookie header. */
export async function signInOverHttp(email: string, password = PASSWORD, baseUrl = APP_URL): Promise<string> {
  const csrfRes = await fetch(`${baseUrl}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';');
      const [k, ...v] = pair!.split('=');
      jar.set(k!, v.join('='));
    }
  };
  keep(csrfRes);
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  const res = await fetch(`${baseUrl}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email, password, json: 'true' }),
  });
  keep(res);
  if (!jar.has('next-auth.session-token')) throw new Error(`sign-in failed for ${email} (${res.status})`);
  return cookie();
}

/** A JSON call to a route handler with an optional session cookie. */
export async function api(path: string, init: { cookie?: string; method?: string; body?: unknown; rawBody?: string } = {}) {
  const res = await fetch(`${APP_URL}${path}`, {
    method: init.method ?? 'GET',
    headers: {
      ...(init.cookie ? { cookie: init.cookie } : {}),
      ...(init.body !== undefined || init.rawBody !== undefined ? { 'content-type': 'application/json' } : {}),
    },
    body: init.rawBody ?? (init.body === undefined ? undefined : JSON.stringify(init.body)),
  });
  const json = (await res.json().catch(() => null)) as Record<string, unknown> | null;
  return { status: res.status, json: json ?? {}, contentType: res.headers.get('content-type') ?? '' };
}
