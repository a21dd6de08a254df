/**
 * Local SMTP catcher: every message the site sends is really delivered over
 * SMTP to this process, kept in memory, and readable as JSON:
 *   GET    /messages   -> { messages: [{ id, from, to, subject, text, receivedAt }] } (oldest first)
 *   DELETE /messages   -> 204, forgets every message
 * Listens on 127.0.0.1 only. Ports: MAIL_SMTP_PORT (SMTP), MAIL_HTTP_PORT (HTTP).
 */
import http from 'node:http';
import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';

interface Caught {
  id: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  receivedAt: string;
}

const smtpPort = Number(process.env.MAIL_SMTP_PORT ?? 5481);
const httpPort = Number(process.env.MAIL_HTTP_PORT ?? 5482);
const MAX_MESSAGES = 2000;
const messages: Caught[] = [];
let counter = 0;

const addresses = (a: AddressObject | AddressObject[] | undefined): string[] =>
  (Array.isArray(a) ? a : a ? [a] : []).flatMap((x) => x.value.map((v) => v.address ?? '')).filter(Boolean);

const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ['STARTTLS', 'AUTH'],
  size: 5 * 1024 * 1024,
  logger: false,
  onData(stream, session, callback) {
    simpleParser(stream)
      .then((mail) => {
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
        messages.push({
          id: String(++counter),
          from: mail.from?.value[0]?.address ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
          to: envelopeTo.length ? envelopeTo : addresses(mail.to),
          subject: mail.subject ?? '',
          text: mail.text ?? '',
          receivedAt: new Date().toISOString(),
        });
        if (messages.length > MAX_MESSAGES) messages.splice(0, messages.length - MAX_MESSAGES);
        callback();
      })
      .catch((err: Error) => callback(err));
  },
});

const web = http.createServer((req, res) => {
  if (req.url === '/messages' && req.method === 'GET') {
    res.writeHead(200, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ messages }));
  } else if (req.url === '/messages' && req.method === 'DELETE') {
    messages.length = 0;
    res.writeHead(204).end();
  } else {
    res.writeHead(404, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ error: { code: 'not-found', message: 'Use GET or DELETE /messages' } }));
  }
});

smtp.listen(smtpPort, '127.0.0.1', () => {
  web.listen(httpPort, '127.0.0.1', () => {
    console.log(`[mail] catching SMTP on 127.0.0.1:${smtpPort}; messages at http://127.0.0.1:${httpPort}/messages`);
  });
});
const stop = () => {
  web.close();
  smtp.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 2000).unref();
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
