/**
 * A local SMTP server that catches every message into the `caught_mail` table, for development,
 * the demo and tests. Administrators read caught mail in the app. Never used when SMTP_URL is set.
 */
import { simpleParser, type AddressObject } from 'mailparser';
import pg from 'pg';
import { SMTPServer } from 'smtp-server';

export interface FakeSmtp {
  url: string;
  port: number;
  stop: () => Promise<void>;
}

const addresses = (a: AddressObject | AddressObject[] | undefined): string[] =>
  (Array.isArray(a) ? a : a ? [a] : []).flatMap((o) => o.value.map((v) => (v.address ?? '').toLowerCase())).filter(Boolean);

export async function startFakeSmtp(opts: { databaseUrl: string; port?: number }): Promise<FakeSmtp> {
  const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 2 });
  // A database restart closes our connections: log and drop them (an unheard 'error' event would
  // end the process). A message arriving meanwhile is refused with a temporary error and retried
  // by the sender. No app logger here: this also runs in the test set-up, before the app's env.
  const lost = (err: Error) => console.warn(`[mail catcher] database connection lost (${err.message}); dropped.`);
  pool.on('error', lost);
  pool.on('connect', (client) => client.on('error', lost));
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Kerfwise local mail catcher',
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address.toLowerCase());
          const to = envelopeTo.length > 0 ? envelopeTo : addresses(mail.to);
          await pool.query(
            'insert into caught_mail (from_address, to_addresses, subject, text_body, html_body) values ($1, $2, $3, $4, $5)',
            [mail.from?.value[0]?.address ?? '', to, mail.subject ?? '', mail.text ?? '', typeof mail.html === 'string' ? mail.html : null],
          );
          callback();
        })
        .catch((err: Error) => callback(Object.assign(err, { responseCode: 451 })));
    },
  });
  const port = await new Promise<number>((resolve, reject) => {
    let listening = false;
    server.on('error', (err: NodeJS.ErrnoException) => {
      if (listening) return; // a client's broken connection; the server goes on
      reject(
        err.code === 'EADDRINUSE'
          ? new Error(`Port ${opts.port} for the local mail catcher is in use. Is another Kerfwise running? Stop it, or set SMTP_URL.`)
          : err,
      );
    });
    server.listen(opts.port ?? 0, '127.0.0.1', () => {
      listening = true;
      const addr = server.server.address();
      resolve(typeof addr === 'object' && addr ? addr.port : 0);
    });
  });
  return {
    port,
    url: `smtp://127.0.0.1:${port}`,
    stop: async () => {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await pool.end();
    },
  };
}
