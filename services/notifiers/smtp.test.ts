import { describe, it, expect, afterEach } from 'vitest';
import { SMTPServer } from 'smtp-server';
import type { AddressInfo } from 'node:net';
import { createNotifier, createSmtpChannel, isRetriable, nextRetryDelayMs } from './index.js';
import { alert, idleTimers, manualClock, tempDir } from './test-helpers.js';

interface Mail {
  from: string;
  to: string[];
  data: string;
  user: string | undefined;
}

const servers: SMTPServer[] = [];
afterEach(async () => {
  while (servers.length) {
    const s = servers.pop()!;
    await new Promise<void>((r) => s.close(() => r()));
  }
});

async function startSmtp(opts: { rejectRcpt?: string } = {}): Promise<{ port: number; mails: Mail[] }> {
  const mails: Mail[] = [];
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS'],
    authOptional: false,
    allowInsecureAuth: true,
    logger: false,
    onAuth(auth, _session, cb) {
      if (auth.username === 'reefd' && auth.password === 'pa55') cb(null, { user: 'reefd' });
      else cb(new Error('Invalid username or password'));
    },
    onRcptTo(address, _session, cb) {
      if (address.address === opts.rejectRcpt) {
        const err = new Error('mailbox unavailable') as Error & { responseCode: number };
        err.responseCode = 550;
        cb(err);
        return;
      }
      cb();
    },
    onData(stream, session, cb) {
      let data = '';
      stream.on('data', (d: Buffer) => (data += d.toString('utf8')));
      stream.on('end', () => {
        mails.push({
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          to: session.envelope.rcptTo.map((r) => r.address),
          data,
          user: session.user as string | undefined,
        });
        cb();
      });
    },
  });
  servers.push(server);
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  return { port: (server.server.address() as AddressInfo).port, mails };
}

describe('SMTP channel end to end (local smtp-server on port 0)', () => {
  it('delivers a grouped alert e-mail with authentication', async () => {
    const { port, mails } = await startSmtp();
    const clock = manualClock();
    const smtp = createSmtpChannel({
      id: 'mail',
      host: '127.0.0.1',
      port,
      secure: false,
      ignoreTls: true,
      from: 'reefd@example.invalid',
      to: ['ops@example.invalid', 'lab@example.invalid'],
      auth: { user: 'reefd', pass: 'pa55' },
      timeoutMs: 5000,
    });
    const n = createNotifier({
      dir: await tempDir(),
      site: 'demo-reef',
      clock,
      timers: idleTimers,
      channels: [smtp],
    });
    await n.start();
    const a = alert({
      rule: 'low_oxygen',
      station: 'crest',
      metric: 'oxygen.o2_mg_l',
      value: 1.8,
      limit: 2,
      severity: 'critical',
    });
    await n.enqueue(a);
    clock.advance(31_000);
    await n.tick();
    await n.stop();
    smtp.close();
    expect(n.status().pending).toEqual({ mail: 0 });
    expect(mails).toHaveLength(1);
    expect(mails[0]!.from).toBe('reefd@example.invalid');
    expect(mails[0]!.to).toEqual(['ops@example.invalid', 'lab@example.invalid']);
    expect(mails[0]!.user).toBe('reefd');
    expect(mails[0]!.data).toMatch(/^Subject: reefd demo-reef: low_oxygen raised at crest\r?$/m);
    // The body is quoted-printable (RFC 2045): undo soft line breaks and =XX escapes before comparing.
    const text = mails[0]!.data
      .replace(/=\r?\n/g, '')
      .replace(/=([0-9A-F]{2})/g, (_m, h: string) => String.fromCharCode(parseInt(h, 16)));
    expect(text).toContain(
      `[critical] low_oxygen raised at crest (oxygen.o2_mg_l) value 1.800 limit 2 t=${a.t} id=${a.id}`,
    );
  });

  it('classifies a 550 refusal as permanent and a refused connection as retriable', async () => {
    const { port } = await startSmtp({ rejectRcpt: 'nobody@example.invalid' });
    const base = {
      id: 'mail',
      host: '127.0.0.1',
      secure: false,
      ignoreTls: true,
      from: 'reefd@example.invalid',
      auth: { user: 'reefd', pass: 'pa55' },
      timeoutMs: 5000,
    };
    const msg = { kind: 'alerts' as const, subject: 's', text: 't', alerts: [], seqs: [] };
    const refused = createSmtpChannel({ ...base, port, to: ['nobody@example.invalid'] });
    const e1 = await refused.send(msg).then(
      () => null,
      (e: unknown) => e,
    );
    refused.close();
    expect(isRetriable(e1)).toBe(false);
    expect(nextRetryDelayMs(e1, 1, { baseMs: 5000, maxMs: 900_000 }, () => 0.5)).toBe(900_000);
    const closed = await startSmtp();
    await new Promise<void>((r) => servers.pop()!.close(() => r()));
    const down = createSmtpChannel({ ...base, port: closed.port, to: ['ops@example.invalid'] });
    const e2 = await down.send(msg).then(
      () => null,
      (e: unknown) => e,
    );
    down.close();
    expect(isRetriable(e2)).toBe(true);
  });
});
