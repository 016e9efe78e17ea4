/**
 * A local fake SMTP server: accepts every message on 127.0.0.1 and stores it in a folder, so the
 * dev mailbox (/dev/mail) and the tests can read back what the app sent. Nothing is relayed.
 *
 *   node_modules/.bin/tsx scripts/mail-fake.ts
 *
 * SMTP_PORT           port to listen on (default 2525 for npm start; npm test uses 2535, the same +10
 *                     offset its database port has over the main one)
 * ERGOSHELF_MAIL_DIR  folder for the stored messages (default .data/mail)
 *
 * Each message becomes `<id>.json` (from, to, subject, text, html, date, messageId) and `<id>.eml`
 * (the raw message). The id starts with the receive time in milliseconds and a counter, so sorting
 * file names sorts messages oldest first. Messages over 1 MB are refused with 552.
 */
import { randomBytes } from "node:crypto";
import { mkdirSync, renameSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";

export const MAX_MESSAGE_BYTES = 1024 * 1024;

function fail(message: string): never {
  console.error(`[mail-fake] ${message}`);
  process.exit(1);
}

const portText = process.env.SMTP_PORT?.trim() || "2525";
const port = Number(portText);
if (!/^\d+$/.test(portText) || port < 1 || port > 65535) fail(`SMTP_PORT must be a port number from 1 to 65535, not "${portText}".`);
const mailDir = resolve(process.env.ERGOSHELF_MAIL_DIR?.trim() || ".data/mail");
try {
  mkdirSync(mailDir, { recursive: true });
} catch (error) {
  fail(`cannot create the mail folder ${mailDir}: ${(error as Error).message}`);
}

let counter = 0;
/** A file name that sorts by arrival: 13-digit milliseconds, a 4-digit counter, 6 random hex digits. */
function nextId(): string {
  counter = (counter + 1) % 10000;
  return `${String(Date.now()).padStart(13, "0")}-${String(counter).padStart(4, "0")}-${randomBytes(3).toString("hex")}`;
}

function addressText(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return "";
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(", ");
}

/** Writes via a temporary name and a rename, so a reader never sees half a file. */
function writeAtomically(path: string, content: string | Buffer) {
  const temporary = `${path}.partial`;
  writeFileSync(temporary, content);
  renameSync(temporary, path);
}

const server = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  size: MAX_MESSAGE_BYTES,
  banner: "Ergoshelf local fake; messages are stored, never relayed",
  logger: false,
  onData(stream, session, callback) {
    const chunks: Buffer[] = [];
    stream.on("data", (chunk: Buffer) => {
      if (!stream.sizeExceeded) chunks.push(chunk);
    });
    stream.on("end", () => {
      if (stream.sizeExceeded) {
        console.log(`[mail-fake] refused a message over ${MAX_MESSAGE_BYTES} bytes`);
        const error = Object.assign(new Error("Message exceeds the 1 MB limit of the fake"), { responseCode: 552 });
        return callback(error);
      }
      const raw = Buffer.concat(chunks);
      simpleParser(raw)
        .then((parsed) => {
          const id = nextId();
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
          const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
          const stored = {
            id,
            from: addressText(parsed.from) || envelopeFrom,
            to: envelopeTo,
            subject: parsed.subject ?? "",
            text: parsed.text ?? "",
            html: typeof parsed.html === "string" ? parsed.html : "",
            date: (parsed.date ?? new Date()).toISOString(),
            receivedAt: new Date().toISOString(),
            messageId: parsed.messageId ?? "",
          };
          writeAtomically(join(mailDir, `${id}.eml`), raw);
          writeAtomically(join(mailDir, `${id}.json`), JSON.stringify(stored, null, 2));
          console.log(`[mail-fake] stored ${id} to ${envelopeTo.join(", ")}: ${JSON.stringify(stored.subject)}`);
          callback(null, `Stored as ${id}`);
        })
        .catch((error: Error) => {
          console.log(`[mail-fake] could not parse a message: ${error.message}`);
          callback(Object.assign(new Error("The fake could not parse this message"), { responseCode: 554 }));
        });
    });
  },
});

server.on("error", (error: NodeJS.ErrnoException) => {
  if (error.code === "EADDRINUSE") fail(`port ${port} on 127.0.0.1 is taken; stop what uses it or set SMTP_PORT to a free port.`);
  if (error.code === "EACCES") fail(`not allowed to listen on port ${port}; choose a port above 1023 with SMTP_PORT.`);
  // Errors of one client connection are not fatal for the fake.
  console.log(`[mail-fake] connection error: ${error.message}`);
});

server.listen(port, "127.0.0.1", () => {
  console.log(`[mail-fake] listening on 127.0.0.1:${port}, storing messages in ${mailDir}`);
});

function stop(signal: string) {
  console.log(`[mail-fake] ${signal}: stopping`);
  server.close(() => process.exit(0));
  // Open client connections get a moment to finish, then the process ends regardless.
  setTimeout(() => process.exit(0), 2000).unref();
}
process.on("SIGTERM", () => stop("SIGTERM"));
process.on("SIGINT", () => stop("SIGINT"));
