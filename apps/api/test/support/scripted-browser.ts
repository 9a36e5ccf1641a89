/**
 * A scripted HTTP client that signs in through the real local identity provider, for tests.
 * It keeps a cookie jar keyed by host that honours Path (oidc-provider scopes its cookies to
 * /interaction/<uid> and /auth/<uid>), follows redirects by hand and fills in the sign-in form.
 */
export interface JarCookie {
  name: string;
  value: string;
  host: string;
  path: string;
  expires?: number;
}

export class CookieJar {
  private cookies: JarCookie[] = [];

  store(url: URL, setCookies: string[]): void {
    for (const header of setCookies) {
      const [pair = '', ...attrs] = header.split(';').map((s) => s.trim());
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq);
      const value = pair.slice(eq + 1);
      let path = url.pathname.replace(/\/[^/]*$/, '') || '/';
      let expires: number | undefined;
      for (const attr of attrs) {
        const [k = '', v = ''] = attr.split('=');
        if (k.toLowerCase() === 'path') path = v || '/';
        if (k.toLowerCase() === 'expires') expires = Date.parse(v);
        if (k.toLowerCase() === 'max-age') expires = Date.now() + Number(v) * 1000;
      }
      this.cookies = this.cookies.filter(
        (c) => !(c.name === name && c.host === url.hostname && c.path === path),
      );
      if (expires === undefined || expires > Date.now()) {
        this.cookies.push({
          name,
          value,
          host: url.hostname,
          path,
          ...(expires ? { expires } : {}),
        });
      }
    }
  }

  header(url: URL): string {
    return this.cookies
      .filter(
        (c) =>
          c.host === url.hostname &&
          (url.pathname === c.path ||
            url.pathname.startsWith(c.path.endsWith('/') ? c.path : `${c.path}/`)) &&
          (c.expires === undefined || c.expires > Date.now()),
      )
      .map((c) => `${c.name}=${c.value}`)
      .join('; ');
  }

  get(name: string, host: string): string | undefined {
    return this.cookies.find((c) => c.name === name && c.host === host)?.value;
  }

  set(name: string, value: string, host: string, path = '/'): void {
    this.cookies = this.cookies.filter((c) => !(c.name === name && c.host === host));
    this.cookies.push({ name, value, host, path });
  }
}

export interface Step {
  url: URL;
  status: number;
  location?: string;
  body: string;
}

export class ScriptedBrowser {
  readonly jar = new CookieJar();
  readonly visited: Step[] = [];

  constructor(private readonly appOrigin: string) {}

  async request(
    url: string | URL,
    init: { method?: string; form?: Record<string, string>; headers?: Record<string, string> } = {},
  ): Promise<Step> {
    const target = new URL(url);
    const headers: Record<string, string> = { ...init.headers };
    const cookie = this.jar.header(target);
    if (cookie) headers.cookie = cookie;
    let body: string | undefined;
    if (init.form) {
      body = new URLSearchParams(init.form).toString();
      headers['content-type'] = 'application/x-www-form-urlencoded';
    }
    const res = await fetch(target, {
      method: init.method ?? 'GET',
      headers,
      body,
      redirect: 'manual',
    });
    this.jar.store(target, res.headers.getSetCookie());
    const step: Step = {
      url: target,
      status: res.status,
      body: await res.text(),
      ...(res.headers.get('location') ? { location: res.headers.get('location')! } : {}),
    };
    this.visited.push(step);
    return step;
  }

  /** Follows redirects from a first request until a page that is not a redirect. */
  async follow(
    url: string | URL,
    init: Parameters<ScriptedBrowser['request']>[1] = {},
  ): Promise<Step> {
    let step = await this.request(url, init);
    for (let i = 0; i < 20 && step.location && step.status >= 300 && step.status < 400; i++) {
      step = await this.request(new URL(step.location, step.url));
    }
    return step;
  }

  /** Submits the first form on a page, with the given fields added to its hidden inputs. */
  async submitForm(page: Step, fields: Record<string, string>): Promise<Step> {
    const form = /<form[^>]*action="([^"]+)"[^>]*>([\s\S]*?)<\/form>/.exec(page.body);
    if (!form) throw new Error(`no form on ${page.url.href}: ${page.body.slice(0, 300)}`);
    const hidden: Record<string, string> = {};
    for (const m of form[2]!.matchAll(/<input[^>]*type="hidden"[^>]*>/g)) {
      const name = /name="([^"]+)"/.exec(m[0])?.[1];
      const value = /value="([^"]*)"/.exec(m[0])?.[1] ?? '';
      if (name) hidden[name] = value;
    }
    const action = new URL(form[1]!.replace(/&amp;/g, '&'), page.url);
    return this.follow(action, {
      method: 'POST',
      form: { ...hidden, ...fields },
      headers: { origin: page.url.origin },
    });
  }

  /** GET /auth/login, then the provider's sign-in form, up to the page the app returns to. */
  async signIn(login: string, password: string, returnTo = '/'): Promise<Step> {
    const form = await this.follow(
      `${this.appOrigin}/auth/login?returnTo=${encodeURIComponent(returnTo)}`,
    );
    if (!/name="password"/.test(form.body)) return form;
    return this.submitForm(form, { login, password });
  }

  /** A JSON call to the app, with the app's Origin on state-changing requests. */
  async api(method: string, path: string): Promise<{ status: number; body: unknown }> {
    const step = await this.request(`${this.appOrigin}${path}`, {
      method,
      headers: {
        accept: 'application/json',
        ...(method !== 'GET' ? { origin: this.appOrigin } : {}),
      },
    });
    return { status: step.status, body: step.body ? JSON.parse(step.body) : undefined };
  }
}
