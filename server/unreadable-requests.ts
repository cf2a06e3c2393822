import type { Server } from 'node:http';
import type { Duplex } from 'node:stream';
import { PROBLEM_TYPES, problemTypeUri } from './problem-types.ts';

/** The two refusals Node's HTTP parser makes before Express sees a request. */
const REFUSALS = {
  // Node's limit on the request line and headers together (16 KB by default).
  431: {
    code: 'headers-too-large',
    reason: 'Request Header Fields Too Large',
    detail:
      'The address and headers together are longer than this installation reads. Search with fewer words, or ask for less at once.',
  },
  400: {
    code: 'unreadable-request',
    reason: 'Bad Request',
    detail: 'The request is not well-formed HTTP. Send it again from the app.',
  },
} as const;

/**
 * Answers a request Node could not parse with problem+json, as the app answers everything else
 * (Node's own answer is a bare status line: the page then had nothing to show). Attach once per
 * server; the connection is closed after the answer, since its framing is unknown.
 *
 * @example
 * answerUnreadableRequests(app.listen(3000), 'https://waterline.example')
 */
export function answerUnreadableRequests(server: Server, publicUrl: string): Server {
  server.on('clientError', (err: NodeJS.ErrnoException, socket: Duplex) => {
    // A client that went away, or a socket already answered: nothing to say, nobody to say it to.
    if (err.code === 'ECONNRESET' || !socket.writable) {
      socket.destroy();
      return;
    }
    const status = err.code === 'HPE_HEADER_OVERFLOW' ? 431 : 400;
    const r = REFUSALS[status];
    const body = JSON.stringify({
      type: problemTypeUri(publicUrl, r.code),
      title: PROBLEM_TYPES[r.code]?.title,
      status,
      detail: r.detail,
    });
    socket.end(
      `HTTP/1.1 ${status} ${r.reason}\r\nContent-Type: application/problem+json; charset=utf-8\r\n` +
        `Content-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body}`,
    );
  });
  return server;
}
