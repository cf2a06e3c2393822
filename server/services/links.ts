import { randomUUID } from 'node:crypto';
import { SignJWT, jwtVerify, errors as joseErrors } from 'jose';

/** What a partner can do with a booking request, one signed link each. */
export const ANSWER_ACTIONS = ['confirm', 'decline', 'propose'] as const;
export type AnswerAction = (typeof ANSWER_ACTIONS)[number];

export interface AnswerClaims {
  purpose: 'answer';
  bookingId: string;
  version: number;
  action: AnswerAction;
  jti: string;
  exp: number;
}
export interface InviteClaims {
  purpose: 'invite';
  invitationId: string;
  jti: string;
  exp: number;
}
export type LinkClaims = AnswerClaims | InviteClaims;

/** Why a link was refused; each gets its own page and a row in link_attempts. */
export type LinkRefusal = 'tampered' | 'expired' | 'wrong-purpose';

export class LinkError extends Error {
  constructor(
    readonly reason: LinkRefusal,
    readonly jti?: string,
  ) {
    super(`link refused: ${reason}`);
  }
}

const ISSUER = 'waterline';
const ALG = 'HS256';

/**
 * Signed, expiring, single-purpose links (HS256 JWTs through jose). A token names one booking
 * version and one action, or one invitation, and carries a jti so it can be used only once.
 */
export class LinkSigner {
  private readonly key: Uint8Array;

  constructor(secret: string) {
    this.key = new TextEncoder().encode(secret);
  }

  async signAnswer(input: {
    bookingId: string;
    version: number;
    action: AnswerAction;
    expiresAt: Date;
  }): Promise<string> {
    return new SignJWT({ bid: input.bookingId, ver: input.version, act: input.action })
      .setProtectedHeader({ alg: ALG })
      .setIssuer(ISSUER)
      .setAudience('answer')
      .setJti(randomUUID())
      .setIssuedAt()
      .setExpirationTime(Math.floor(input.expiresAt.getTime() / 1000))
      .sign(this.key);
  }

  async signInvite(input: { invitationId: string; expiresAt: Date }): Promise<string> {
    return new SignJWT({ inv: input.invitationId })
      .setProtectedHeader({ alg: ALG })
      .setIssuer(ISSUER)
      .setAudience('invite')
      .setJti(randomUUID())
      .setIssuedAt()
      .setExpirationTime(Math.floor(input.expiresAt.getTime() / 1000))
      .sign(this.key);
  }

  /** The claims of a good token for `purpose`, or LinkError saying why not. */
  async verify<P extends LinkClaims['purpose']>(
    token: string,
    purpose: P,
    now = new Date(),
  ): Promise<Extract<LinkClaims, { purpose: P }>> {
    try {
      const { payload } = await jwtVerify(token, this.key, {
        issuer: ISSUER,
        audience: purpose,
        algorithms: [ALG],
        currentDate: now,
      });
      const jti = typeof payload.jti === 'string' ? payload.jti : '';
      if (!jti || typeof payload.exp !== 'number') throw new LinkError('tampered');
      if (purpose === 'answer') {
        const { bid, ver, act } = payload as { bid?: unknown; ver?: unknown; act?: unknown };
        if (typeof bid !== 'string' || !Number.isInteger(ver) || !ANSWER_ACTIONS.includes(act as AnswerAction))
          throw new LinkError('tampered', jti);
        return {
          purpose,
          bookingId: bid,
          version: ver as number,
          action: act as AnswerAction,
          jti,
          exp: payload.exp,
        } as Extract<LinkClaims, { purpose: P }>;
      }
      const { inv } = payload as { inv?: unknown };
      if (typeof inv !== 'string') throw new LinkError('tampered', jti);
      return { purpose, invitationId: inv, jti, exp: payload.exp } as Extract<LinkClaims, { purpose: P }>;
    } catch (error) {
      if (error instanceof LinkError) throw error;
      if (error instanceof joseErrors.JWTExpired) throw new LinkError('expired', jtiOf(token));
      if (error instanceof joseErrors.JWTClaimValidationFailed && error.claim === 'aud')
        throw new LinkError('wrong-purpose', jtiOf(token));
      throw new LinkError('tampered');
    }
  }
}

/** The jti of a token whose signature checked out but whose claims did not (for the log only). */
function jtiOf(token: string): string | undefined {
  try {
    const body = JSON.parse(Buffer.from(token.split('.')[1] ?? '', 'base64url').toString('utf8')) as { jti?: unknown };
    return typeof body.jti === 'string' ? body.jti.slice(0, 64) : undefined;
  } catch {
    return undefined;
  }
}
