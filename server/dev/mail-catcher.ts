/**
 * A local SMTP catcher standing in for the hosted mail service in development and tests: it
 * accepts every message and lists what it received over HTTP (GET /messages, DELETE /messages).
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';

export type CaughtMessage = { id: number; to: string[]; from: string; subject: string; text: string; receivedAt: string };

export type RunningCatcher = {
  smtpPort: number;
  httpUrl: string;
  messages: CaughtMessage[];
  /** Stops accepting SMTP connections (to test outages) while keeping the listing. */
  stopSmtp: () => Promise<void>;
  startSmtp: () => Promise<void>;
  close: () => Promise<void>;
};

export async function startMailCatcher(options: { smtpPort: number; httpPort: number }): Promise<RunningCatcher> {
  const messages: CaughtMessage[] = [];
  let nextId = 1;

  const makeSmtp = () =>
    new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      banner: 'Orrery local mail catcher',
      size: 1024 * 1024,
      logger: false,
      onData(stream, session, callback) {
        simpleParser(stream)
          .then((parsed) => {
            messages.push({
              id: nextId++,
              to: session.envelope.rcptTo.map((r) => r.address),
              from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
              subject: parsed.subject ?? '',
              text: parsed.text ?? '',
              receivedAt: new Date().toISOString(),
            });
            callback();
          })
          .catch((error: Error) => callback(error));
      },
    });

  let smtp: SMTPServer | undefined;
  let smtpPort = options.smtpPort;
  const startSmtp = async () => {
    if (smtp) return;
    smtp = makeSmtp();
    await new Promise<void>((resolve, reject) => {
      smtp!.once('error', reject);
      smtp!.listen(smtpPort, '127.0.0.1', () => resolve());
    });
    smtpPort = (smtp.server.address() as AddressInfo).port;
  };
  const stopSmtp = async () => {
    if (!smtp) return;
    const closing = smtp;
    smtp = undefined;
    await new Promise<void>((resolve) => closing.close(() => resolve()));
  };
  await startSmtp();

  const web = http.createServer((req, res) => {
    if (req.url === '/messages' && req.method === 'GET') {
      res.writeHead(200, { 'content-type': 'application/json' });
      res.end(JSON.stringify({ messages: [...messages].reverse() }));
    } else if (req.url === '/messages' && req.method === 'DELETE') {
      messages.length = 0;
      res.writeHead(204).end();
    } else {
      res.writeHead(404).end();
    }
  });
  await new Promise<void>((resolve) => web.listen(options.httpPort, '127.0.0.1', () => resolve()));
  const httpPort = (web.address() as AddressInfo).port;

  return {
    get smtpPort() {
      return smtpPort;
    },
    httpUrl: `http://127.0.0.1:${httpPort}`,
    messages,
    stopSmtp,
    startSmtp,
    close: async () => {
      await stopSmtp();
      await new Promise<void>((resolve) => {
        web.close(() => resolve());
        web.closeAllConnections();
      });
    },
  };
}
