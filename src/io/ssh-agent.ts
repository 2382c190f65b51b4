/**
 * A small ssh-agent client (the agent protocol of OpenSSH's PROTOCOL.agent and the IETF draft):
 * list identities, and sign data with one of them. The private key stays in the agent.
 */
import { createConnection } from 'node:net';

const REQUEST_IDENTITIES = 11;
const IDENTITIES_ANSWER = 12;
const SIGN_REQUEST = 13;
const SIGN_RESPONSE = 14;
const FAILURE = 5;
const TIMEOUT_MS = 30_000;

export class AgentError extends Error {}

function frame(type: number, ...parts: Buffer[]): Buffer {
  const body = Buffer.concat([Buffer.from([type]), ...parts]);
  const len = Buffer.alloc(4);
  len.writeUInt32BE(body.length, 0);
  return Buffer.concat([len, body]);
}

function str(b: Buffer): Buffer {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(b.length, 0);
  return Buffer.concat([len, b]);
}

/** Sends one request and returns the agent's reply (type byte first). */
function request(socket: string, message: Buffer): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const conn = createConnection(socket);
    const chunks: Buffer[] = [];
    let size = 0;
    const timer = setTimeout(() => {
      conn.destroy();
      reject(new AgentError(`the agent at ${socket} did not answer within ${TIMEOUT_MS / 1000} s (is it waiting for a confirmation?)`));
    }, TIMEOUT_MS);
    conn.on('connect', () => conn.write(message));
    conn.on('data', (d: Buffer) => {
      chunks.push(d);
      size += d.length;
      const all = Buffer.concat(chunks, size);
      if (all.length >= 4 && all.length >= 4 + all.readUInt32BE(0)) {
        clearTimeout(timer);
        conn.end();
        resolve(all.subarray(4, 4 + all.readUInt32BE(0)));
      }
    });
    conn.on('error', (e: NodeJS.ErrnoException) => {
      clearTimeout(timer);
      reject(new AgentError(`cannot reach the agent at ${socket} (${e.code ?? e.message})`));
    });
    conn.on('close', () => {
      clearTimeout(timer);
      reject(new AgentError(`the agent at ${socket} closed the connection without an answer`));
    });
  });
}

function readString(b: Buffer, at: number): [Buffer, number] {
  if (at + 4 > b.length) throw new AgentError('the agent sent a short answer');
  const n = b.readUInt32BE(at);
  if (at + 4 + n > b.length) throw new AgentError('the agent sent a short answer');
  return [b.subarray(at + 4, at + 4 + n), at + 4 + n];
}

export async function agentIdentities(socket: string): Promise<{ blob: Buffer; comment: string }[]> {
  const reply = await request(socket, frame(REQUEST_IDENTITIES));
  if (reply[0] !== IDENTITIES_ANSWER) throw new AgentError(`the agent refused to list its keys (reply type ${reply[0]})`);
  const n = reply.readUInt32BE(1);
  const out: { blob: Buffer; comment: string }[] = [];
  let at = 5;
  for (let i = 0; i < n; i++) {
    const [blob, next] = readString(reply, at);
    const [comment, after] = readString(reply, next);
    out.push({ blob: Buffer.from(blob), comment: comment.toString('utf8') });
    at = after;
  }
  return out;
}

/** The agent's signature blob (string type, string signature) of `data` with the key `blob`. */
export async function agentSign(socket: string, blob: Buffer, data: Buffer): Promise<Buffer> {
  const reply = await request(socket, frame(SIGN_REQUEST, str(blob), str(data), Buffer.alloc(4)));
  if (reply[0] === FAILURE)
    throw new AgentError('the agent refused to sign (the key may have been removed, or a confirmation was declined)');
  if (reply[0] !== SIGN_RESPONSE) throw new AgentError(`the agent sent an unexpected reply (type ${reply[0]})`);
  return Buffer.from(readString(reply, 1)[0]);
}
