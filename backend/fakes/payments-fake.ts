// A local stand-in for the hosted payment provider, speaking enough of its HTTP API for the
// official SDK: create and read checkout sessions, a hosted page where one can pay or cancel, and
// signed webhooks ("Stripe-Signature", made the way the provider makes it) sent to the app when a
// session is paid, retried until the app answers 2xx. No real money moves; sessions live in memory.
import { randomBytes } from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import Stripe from 'stripe';

export interface FakeSession {
  id: string;
  object: 'checkout.session';
  mode: string;
  status: 'open' | 'complete' | 'expired';
  payment_status: 'unpaid' | 'paid';
  amount_subtotal: number;
  amount_total: number;
  currency: string;
  client_reference_id: string | null;
  customer_email: string | null;
  metadata: Record<string, string>;
  success_url: string;
  cancel_url: string;
  url: string | null;
  payment_intent: string | null;
  line_items_summary: { name: string; description: string | null; quantity: number; unit_amount: number }[];
  created: number;
  expires_at: number;
  livemode: false;
}

export interface PaymentsFakeOptions {
  port?: number;
  host?: string;
  /** The API key the app must present. */
  secretKey?: string;
  /** The signing secret of webhooks. */
  webhookSecret?: string;
  /** Where paid sessions are reported. */
  webhookUrl?: string;
  /** Extra delivery attempts after the first, in the background. */
  webhookRetries?: number;
}

export interface PaymentsFake {
  port: number;
  url: string;
  webhookUrl: string;
  sessions: Map<string, FakeSession>;
  /** Every webhook delivery attempt: event id, type, HTTP status (0 when unreachable). */
  deliveries: { eventId: string; type: string; status: number }[];
  /** API calls the fake answers with a provider outage (HTTP 503) while listed, to test how the app copes. */
  failing: Set<'create' | 'retrieve' | 'expire'>;
  close(): Promise<void>;
}

const defaults = {
  secretKey: 'sk_test_cellarwright_local',
  webhookSecret: 'whsec_cellarwright_local',
};

/** Decodes the SDK's form encoding (`a[b][0][c]=v`) into nested objects and arrays. */
export function parseForm(body: string): Record<string, unknown> {
  const root: Record<string, unknown> = {};
  for (const [rawKey, value] of new URLSearchParams(body)) {
    const parts = rawKey.split(/\[|\]\[|\]/).filter((p) => p !== '');
    let node: Record<string, unknown> = root;
    parts.forEach((part, i) => {
      if (i === parts.length - 1) {
        node[part] = value;
        return;
      }
      const nextIsIndex = /^\d+$/.test(parts[i + 1]!);
      if (node[part] === undefined) node[part] = nextIsIndex ? [] : {};
      node = node[part] as Record<string, unknown>;
    });
  }
  return root;
}

const id = (prefix: string) => `${prefix}_test_${randomBytes(12).toString('hex')}`;
const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function money(cents: number, currency: string) {
  try {
    return new Intl.NumberFormat('en-GB', { style: 'currency', currency: currency.toUpperCase() }).format(cents / 100);
  } catch {
    return `${(cents / 100).toFixed(2)} ${currency.toUpperCase()}`;
  }
}

function apiError(res: http.ServerResponse, status: number, type: string, message: string, param?: string) {
  res.writeHead(status, { 'content-type': 'application/json', 'request-id': id('req') });
  res.end(JSON.stringify({ error: { type, message, ...(param ? { param } : {}) } }));
}

function json(res: http.ServerResponse, body: unknown) {
  res.writeHead(200, { 'content-type': 'application/json', 'request-id': id('req') });
  res.end(JSON.stringify(body));
}

function readBody(req: http.IncomingMessage): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')));
    req.on('error', reject);
  });
}

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(title)}</title>
<style>
  body { margin: 0; font-family: system-ui, sans-serif; background: #eef1f4; color: #17202a; }
  main { max-width: 26rem; margin: 4rem auto; background: #fff; border: 1px solid #cfd6de; border-radius: 10px; padding: 1.75rem; }
  .sandbox { font-size: .8rem; letter-spacing: .04em; text-transform: uppercase; color: #4a5868; margin: 0 0 1rem; }
  h1 { font-size: 1.1rem; margin: 0 0 .25rem; }
  .amount { font-size: 2rem; margin: .75rem 0; font-variant-numeric: tabular-nums; }
  dl { display: grid; grid-template-columns: auto 1fr; gap: .25rem .75rem; font-size: .9rem; color: #4a5868; }
  dd { margin: 0; color: #17202a; }
  form { margin-top: 1.25rem; }
  button { width: 100%; font: inherit; padding: .8rem; border-radius: 8px; cursor: pointer; }
  .pay { background: #1f4e79; color: #fff; border: 0; }
  .cancel { background: transparent; border: 1px solid #cfd6de; color: #17202a; margin-top: .5rem; }
</style></head><body><main>${body}</main></body></html>`;
}

export async function startPaymentsFake(opts: PaymentsFakeOptions = {}): Promise<PaymentsFake> {
  const secretKey = opts.secretKey ?? defaults.secretKey;
  const webhookSecret = opts.webhookSecret ?? defaults.webhookSecret;
  const retries = opts.webhookRetries ?? 8;
  const sessions = new Map<string, FakeSession>();
  const deliveries: PaymentsFake['deliveries'] = [];
  const timers = new Set<NodeJS.Timeout>();
  let baseUrl = '';

  const fake: PaymentsFake = {
    port: 0,
    url: '',
    webhookUrl: opts.webhookUrl ?? '',
    sessions,
    deliveries,
    failing: new Set(),
    close: async () => {
      for (const t of timers) clearTimeout(t);
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };

  async function deliverOnce(eventId: string, type: string, payload: string): Promise<boolean> {
    // Signed at each attempt, with the attempt's timestamp, as the provider does.
    const signature = Stripe.webhooks.generateTestHeaderString({ payload, secret: webhookSecret });
    let status: number;
    try {
      const r = await fetch(fake.webhookUrl, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signature }, body: payload });
      status = r.status;
      await r.arrayBuffer();
    } catch {
      status = 0;
    }
    deliveries.push({ eventId, type, status });
    return status >= 200 && status < 300;
  }

  /** Sends an event; the first attempts are awaited, later ones (with backoff) run in the background. */
  async function sendEvent(type: string, object: FakeSession): Promise<boolean> {
    const event = {
      id: id('evt'),
      object: 'event',
      api_version: '2026-11-01',
      created: Math.floor(Date.now() / 1000),
      livemode: false,
      pending_webhooks: 1,
      type,
      data: { object },
    };
    const payload = JSON.stringify(event);
    if (!fake.webhookUrl) return false;
    for (let attempt = 0; attempt < 3; attempt++) {
      if (await deliverOnce(event.id, type, payload)) return true;
      await new Promise((r) => setTimeout(r, 150 * (attempt + 1)));
    }
    let attempt = 0;
    const retry = () => {
      if (attempt++ >= retries) return;
      const t = setTimeout(
        async () => {
          timers.delete(t);
          if (!(await deliverOnce(event.id, type, payload))) retry();
        },
        Math.min(30_000, 1000 * 2 ** attempt),
      );
      timers.add(t);
    };
    retry();
    return false;
  }

  function createSession(params: Record<string, unknown>): FakeSession | string {
    if (params.mode !== 'payment') return 'mode: only "payment" is supported by this fake';
    const items = Array.isArray(params.line_items) ? (params.line_items as Record<string, unknown>[]) : [];
    if (items.length === 0) return 'line_items: at least one is required';
    let total = 0;
    let currency = '';
    const summary: FakeSession['line_items_summary'] = [];
    for (const li of items) {
      const pd = (li.price_data ?? {}) as Record<string, unknown>;
      const product = (pd.product_data ?? {}) as Record<string, unknown>;
      const unit = Number(pd.unit_amount);
      const qty = Number(li.quantity ?? 1);
      if (!Number.isInteger(unit) || unit <= 0) return 'line_items[].price_data.unit_amount: a positive whole number of cents is required';
      if (!Number.isInteger(qty) || qty <= 0) return 'line_items[].quantity: a positive whole number is required';
      if (typeof pd.currency !== 'string' || !/^[a-z]{3}$/.test(pd.currency)) return 'line_items[].price_data.currency: a three-letter code is required';
      if (currency && currency !== pd.currency) return 'line_items: all items must share one currency';
      currency = pd.currency;
      total += unit * qty;
      summary.push({
        name: typeof product.name === 'string' ? product.name : 'Item',
        description: typeof product.description === 'string' ? product.description : null,
        quantity: qty,
        unit_amount: unit,
      });
    }
    if (typeof params.success_url !== 'string' || typeof params.cancel_url !== 'string') return 'success_url and cancel_url are required';
    const sid = id('cs');
    const now = Math.floor(Date.now() / 1000);
    return {
      id: sid,
      object: 'checkout.session',
      mode: 'payment',
      status: 'open',
      payment_status: 'unpaid',
      amount_subtotal: total,
      amount_total: total,
      currency,
      client_reference_id: typeof params.client_reference_id === 'string' ? params.client_reference_id : null,
      customer_email: typeof params.customer_email === 'string' ? params.customer_email : null,
      metadata: (params.metadata as Record<string, string>) ?? {},
      success_url: params.success_url,
      cancel_url: params.cancel_url,
      url: `${baseUrl}/pay/${sid}`,
      payment_intent: null,
      line_items_summary: summary,
      created: now,
      expires_at: now + 24 * 3600,
      livemode: false,
    };
  }

  function publicSession(s: FakeSession) {
    const { line_items_summary: _summary, ...rest } = s;
    return rest;
  }

  const server = http.createServer(async (req, res) => {
    try {
      const url = new URL(req.url ?? '/', baseUrl);
      const parts = url.pathname.split('/').filter(Boolean);

      if (url.pathname === '/health') return json(res, { ok: true });

      // ---- The provider's API, as the SDK calls it ----
      if (parts[0] === 'v1') {
        const auth = req.headers.authorization ?? '';
        if (auth !== `Bearer ${secretKey}`) return apiError(res, 401, 'invalid_request_error', 'Invalid API Key provided.');
        if (parts[1] === 'checkout' && parts[2] === 'sessions') {
          const op = req.method === 'POST' && parts.length === 3 ? 'create' : parts[4] === 'expire' ? 'expire' : 'retrieve';
          if (fake.failing.has(op)) {
            await readBody(req);
            return apiError(res, 503, 'api_error', 'The provider is unavailable (simulated outage).');
          }
          if (req.method === 'POST' && parts.length === 3) {
            const created = createSession(parseForm(await readBody(req)));
            if (typeof created === 'string') return apiError(res, 400, 'invalid_request_error', created);
            sessions.set(created.id, created);
            return json(res, publicSession(created));
          }
          const s = parts[3] ? sessions.get(parts[3]) : undefined;
          if (!s) return apiError(res, 404, 'invalid_request_error', `No such checkout.session: '${parts[3] ?? ''}'`, 'session');
          if (req.method === 'GET' && parts.length === 4) return json(res, publicSession(s));
          if (req.method === 'POST' && parts[4] === 'expire') {
            await readBody(req);
            if (s.status !== 'open') return apiError(res, 400, 'invalid_request_error', `Only an open session can be expired; this one is ${s.status}.`);
            s.status = 'expired';
            s.url = null;
            await sendEvent('checkout.session.expired', publicSession(s) as FakeSession);
            return json(res, publicSession(s));
          }
        }
        return apiError(res, 404, 'invalid_request_error', `Unrecognized request URL (${req.method}: ${url.pathname}).`);
      }

      // ---- The hosted payment page ----
      if (parts[0] === 'pay' && parts[1]) {
        const s = sessions.get(parts[1]);
        if (!s) {
          res.writeHead(404, { 'content-type': 'text/html; charset=utf-8' });
          return res.end(page('Not found', '<h1>This payment link is not known.</h1>'));
        }
        if (req.method === 'GET' && parts.length === 2) {
          const item = s.line_items_summary[0];
          const body =
            s.status === 'open'
              ? `<p class="sandbox">Sandbox payment page · no real money moves</p>
<h1>${esc(item?.description ?? 'Payment')}</h1>
<p>${esc(item?.name ?? '')}</p>
<p class="amount" data-testid="amount">${esc(money(s.amount_total, s.currency))}</p>
<dl><dt>E-mail</dt><dd>${esc(s.customer_email ?? '—')}</dd><dt>Card</dt><dd>Sandbox card ending 4242</dd></dl>
<form method="post" action="/pay/${esc(s.id)}/confirm"><button class="pay" type="submit">Pay ${esc(money(s.amount_total, s.currency))}</button></form>
<form method="post" action="/pay/${esc(s.id)}/cancel"><button class="cancel" type="submit">Cancel and go back</button></form>`
              : `<p class="sandbox">Sandbox payment page</p><h1>This checkout is ${esc(s.status)}.</h1><p><a href="${esc(s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id))}">Return to the shop</a></p>`;
          res.writeHead(200, { 'content-type': 'text/html; charset=utf-8', 'cache-control': 'no-store' });
          return res.end(page('Pay', body));
        }
        if (req.method === 'POST' && parts[2] === 'confirm') {
          await readBody(req);
          if (s.status === 'open') {
            s.status = 'complete';
            s.payment_status = 'paid';
            s.payment_intent = id('pi');
            await sendEvent('checkout.session.completed', publicSession(s) as FakeSession);
          }
          res.writeHead(303, { location: s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id) });
          return res.end();
        }
        if (req.method === 'POST' && parts[2] === 'cancel') {
          await readBody(req);
          res.writeHead(303, { location: s.cancel_url });
          return res.end();
        }
      }
      res.writeHead(404, { 'content-type': 'text/plain' });
      res.end('not found');
    } catch (err) {
      res.writeHead(500, { 'content-type': 'application/json' });
      res.end(JSON.stringify({ error: { type: 'api_error', message: (err as Error).message } }));
    }
  });

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, opts.host ?? '127.0.0.1', () => resolve());
  });
  const address = server.address() as AddressInfo;
  baseUrl = `http://${opts.host ?? '127.0.0.1'}:${address.port}`;
  fake.port = address.port;
  fake.url = baseUrl;
  return fake;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const appPort = process.env.PORT ?? '3000';
  const fake = await startPaymentsFake({
    port: Number(process.env.PAYMENTS_FAKE_PORT ?? 4242),
    secretKey: process.env.STRIPE_SECRET_KEY ?? defaults.secretKey,
    webhookSecret: process.env.STRIPE_WEBHOOK_SECRET ?? defaults.webhookSecret,
    webhookUrl: process.env.PAYMENTS_WEBHOOK_URL ?? `http://127.0.0.1:${appPort}/api/webhooks/payments`,
  });
  console.log(`payment provider fake on ${fake.url} (webhooks to ${fake.webhookUrl})`);
  const stop = () => fake.close().then(() => process.exit(0));
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}
