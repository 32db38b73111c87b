/**
 * The local fake SMTP server (MAIL_MODE=fake, the default outside production): listens on 127.0.0.1 on a
 * random port, parses each message with mailparser and stores it in fake_mailbox, so the admin Outbox page
 * shows what would have been sent, across restarts. No TLS: smtp-server's built-in certificate has expired
 * (STACK P12), so STARTTLS is disabled and the transport uses ignoreTLS.
 */
import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { FakeMail } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';

export interface FakeSmtpServer {
  host: string;
  port: number;
  close(): Promise<void>;
}

const addresses = (a: AddressObject | AddressObject[] | undefined) => (a ? ([] as AddressObject[]).concat(a).map((x) => x.text).join(', ') : '');

export async function startFakeSmtpServer(opts: { host?: string; port?: number } = {}): Promise<FakeSmtpServer> {
  const host = opts.host ?? '127.0.0.1';
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((parsed) =>
          writeTransaction((transaction) =>
            FakeMail.create(
              {
                fromAddress: addresses(parsed.from),
                toAddress: addresses(parsed.to),
                subject: parsed.subject ?? '',
                text: parsed.text ?? '',
                html: typeof parsed.html === 'string' ? parsed.html : '',
                receivedAt: new Date().toISOString(),
              },
              { transaction },
            ),
          ),
        )
        .then(() => callback(), (err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, host, () => resolve());
  });
  const { port } = server.server.address() as AddressInfo;
  return {
    host,
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
