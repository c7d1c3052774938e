import "server-only";
import { DrizzleAdapter } from "@auth/drizzle-adapter";
import type { NextAuthOptions } from "next-auth";
import type { Adapter } from "next-auth/adapters";
import CredentialsProvider from "next-auth/providers/credentials";
import EmailProvider from "next-auth/providers/email";
import { db } from "@/db/client";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";
import { findPendingPasswordHash, proveAddressByLink } from "@/db/queries/pending-sign-ups";
import { endSession, isSessionLive, openSession } from "@/db/queries/sessions";
import { findUserByEmail } from "@/db/queries/users";
import { createOwnedWorkspace } from "@/db/queries/workspaces";
import { env } from "@/lib/env";
import { clientAddress, headerRecord } from "@/lib/http/client-address";
import { logSafeMessage } from "@/lib/log-safe";
import { queueMail } from "@/lib/mail";
import { signInSchema } from "@/lib/validation/auth";
import { signInLinkMessage } from "./emails";
import { hashPassword, verifyPassword } from "./password";
import { sameOriginPath } from "./redirects";
import {
  admitSignInAttempt,
  admitSignInLink,
  clearSignInFailures,
  recordFailedSignIn,
} from "./rate-limit";

// Comparing against a throwaway hash when the address is unknown keeps the response time the
// same whether or not an account exists, so timing cannot enumerate accounts.
let decoyHash: Promise<string> | undefined;
const getDecoyHash = () => (decoyHash ??= hashPassword(crypto.randomUUID()));

async function matchesPendingSignUp(email: string, password: string): Promise<boolean> {
  const pendingHash = await findPendingPasswordHash(email);
  return pendingHash !== undefined && (await verifyPassword(password, pendingHash));
}

/** Said only to someone who typed the right password, so it reveals nothing to others. */
const CONFIRM_FIRST =
  "Confirm your e-mail address first: follow the link we sent when you signed up, or sign in once with an e-mail link.";

/**
 * Twelve hours from sign-in: a working day, after which a left-open browser on a shared machine no
 * longer opens anyone's reports. Sign-out and the other endings take effect at once regardless.
 */
export const SESSION_MAX_AGE_SECONDS = 12 * 60 * 60;

/** Built on demand: configuration is read at request time, never during `next build`. */
export function authOptions(): NextAuthOptions {
  const config = env();
  return {
    secret: config.NEXTAUTH_SECRET,
    // The Auth.js adapter shares next-auth 4's runtime contract; only the type packages differ.
    adapter: DrizzleAdapter(db(), {
      usersTable: users,
      accountsTable: accounts,
      sessionsTable: sessions,
      verificationTokensTable: verificationTokens,
    }) as Adapter,
    // Credentials sign-in only works with JWT sessions in next-auth 4; each token names a
    // server-side session row, so ending the row ends the session (db/queries/sessions.ts).
    session: { strategy: "jwt", maxAge: SESSION_MAX_AGE_SECONDS },
    // next-auth logs adapter failures with the failed query's parameters (token hashes).
    logger: {
      error: (code, metadata) => console.error(`[auth] ${code}:`, logSafeMessage(metadata)),
      warn: (code) => console.warn(`[auth] ${code}`),
      debug: () => undefined,
    },
    pages: { signIn: "/sign-in", verifyRequest: "/sign-in/check-email", error: "/sign-in" },
    providers: [
      CredentialsProvider({
        name: "Password",
        credentials: { email: { type: "email" }, password: { type: "password" } },
        async authorize(credentials, request) {
          const parsed = signInSchema.safeParse(credentials);
          if (!parsed.success) return null;
          const { email, password } = parsed.data;
          const client = clientAddress(headerRecord(request?.headers), config.TRUSTED_PROXY_HOPS);
          await admitSignInAttempt(email, client);
          const user = await findUserByEmail(email);
          const matches = await verifyPassword(
            password,
            user?.passwordHash ?? (await getDecoyHash()),
          );
          if (!user?.passwordHash || !matches) {
            if (!user?.emailVerified && (await matchesPendingSignUp(email, password))) {
              throw new Error(CONFIRM_FIRST);
            }
            await recordFailedSignIn(email, client);
            return null;
          }
          // An address nobody proved may belong to someone else than who set this password.
          if (!user.emailVerified) throw new Error(CONFIRM_FIRST);
          await clearSignInFailures(email, client);
          return { id: user.id, name: user.name, email: user.email };
        },
      }),
      EmailProvider({
        from: config.MAIL_FROM,
        maxAge: 24 * 60 * 60,
        async sendVerificationRequest({ identifier, url }) {
          await admitSignInLink(identifier);
          await queueMail({ to: identifier, ...signInLinkMessage(url) });
        },
      }),
    ],
    callbacks: {
      // next-auth's default throws (a 500) on a callback URL it cannot parse; this falls back instead.
      redirect({ url, baseUrl }) {
        return new URL(sameOriginPath(url, baseUrl), baseUrl).toString();
      },
      // Following an e-mail link proves the address; whatever was set on the account before
      // that proof may be an intruder's and is ended (db/queries/pending-sign-ups.ts).
      async signIn({ user, account, email }) {
        if (account?.provider === "email" && !email?.verificationRequest && user.email) {
          await proveAddressByLink(user.email);
        }
        return true;
      },
      // Runs on sign-in (with `user`) and on every request that reads the session: a token whose
      // server-side session has ended becomes empty, which signs nobody in.
      async jwt({ token, user }) {
        if (user) {
          const expires = new Date(Date.now() + SESSION_MAX_AGE_SECONDS * 1000);
          return { ...token, sid: await openSession(user.id, expires) };
        }
        const live =
          typeof token.sid === "string" &&
          typeof token.sub === "string" &&
          (await isSessionLive(token.sid, token.sub));
        return live ? token : {};
      },
      session({ session, token }) {
        if (session.user && token.sub) session.user.id = token.sub;
        return session;
      },
    },
    events: {
      async signOut({ token }) {
        if (typeof token?.sid === "string") await endSession(token.sid);
      },
      // Someone who first arrives through an e-mail link gets a workspace of their own, exactly
      // like someone who signs up with a password.
      async createUser({ user }) {
        const label = user.email?.split("@")[0] ?? "My";
        await createOwnedWorkspace(db(), user.id, `${label}'s workspace`);
      },
    },
  };
}
