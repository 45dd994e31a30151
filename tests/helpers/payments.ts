import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { startPaymentsFake, type PaymentsFake } from '../../backend/fakes/payments-fake.ts';
import { createTestContext, type TestContext } from './context.ts';

export interface PaymentsTestContext {
  ctx: TestContext;
  fake: PaymentsFake;
  /** The app listening on loopback, where the provider's fake sends its webhooks and returns the payer. */
  server: Server;
  appUrl: string;
  close(): Promise<void>;
}

/** A test context whose app listens on a port and takes payments through the provider's local fake. */
export async function paymentsTestContext(): Promise<PaymentsTestContext> {
  const fake = await startPaymentsFake({ webhookRetries: 0 });
  const ctx = await createTestContext({ PAYMENTS_FAKE_PORT: String(fake.port) });
  const server = ctx.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  const appUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  ctx.config.publicUrl = appUrl;
  fake.webhookUrl = `${appUrl}/api/webhooks/payments`;
  return {
    ctx,
    fake,
    server,
    appUrl,
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await fake.close();
      await ctx.close();
    },
  };
}
