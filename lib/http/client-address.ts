/**
 * The header scripts/serve-app.mjs writes with the connection's own address; it replaces any value
 * a client sends under this name, so it can be believed whenever that server is in front.
 */
export const PEER_ADDRESS_HEADER = "x-partita-peer-address";

/** Stands for "no address known" (e.g. Next's own dev server): one shared budget, never loopback. */
export const UNKNOWN_CLIENT = "unknown";

type HeaderSource = { get(name: string): string | null };

/**
 * The caller's address as the server sees it. With `trustedProxyHops` = 0 X-Forwarded-For is
 * ignored (any client can write it). With n proxies in front, each appends the address it saw, so
 * the client is the n-th address from the right of [...X-Forwarded-For, peer]; entries further
 * left were written by the client and are ignored.
 */
export function clientAddress(headers: HeaderSource, trustedProxyHops: number): string {
  const peer = headers.get(PEER_ADDRESS_HEADER)?.trim();
  if (!peer) return UNKNOWN_CLIENT;
  if (trustedProxyHops === 0) return normalize(peer);
  const forwarded = (headers.get("x-forwarded-for") ?? "")
    .split(",")
    .map((entry) => entry.trim())
    .filter(Boolean);
  const chain = [...forwarded, peer];
  return normalize(chain[Math.max(0, chain.length - 1 - trustedProxyHops)]);
}

/** `::ffff:127.0.0.1` (an IPv4 client on a dual-stack socket) is the same client as `127.0.0.1`. */
function normalize(address: string): string {
  return address.replace(/^::ffff:(?=\d+\.\d+\.\d+\.\d+$)/, "");
}

/** Loopback: 127.0.0.0/8, ::1 or the name localhost. */
export function isLoopback(address: string | undefined): boolean {
  if (!address) return false;
  const plain = normalize(address.replace(/^\[|\]$/g, ""));
  return plain === "::1" || plain === "localhost" || /^127\.\d+\.\d+\.\d+$/.test(plain);
}

/** Plain header records (next-auth's `request.headers`) as a `get` source. */
export function headerRecord(record: Record<string, string | string[] | undefined> | undefined) {
  return {
    get(name: string): string | null {
      const value = record?.[name];
      return (Array.isArray(value) ? value.join(",") : value) ?? null;
    },
  };
}
