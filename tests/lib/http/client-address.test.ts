import { describe, expect, it } from "vitest";
import {
  clientAddress,
  isLoopback,
  PEER_ADDRESS_HEADER,
  UNKNOWN_CLIENT,
} from "@/lib/http/client-address";

const headers = (values: Record<string, string>) => new Headers(values);

// X-Forwarded-For semantics (each proxy appends the address it received the request from) as in
// MDN's X-Forwarded-For reference (common practice).
describe("clientAddress", () => {
  it("ignores X-Forwarded-For unless proxies are configured", () => {
    const sent = headers({ [PEER_ADDRESS_HEADER]: "198.51.100.4", "x-forwarded-for": "10.9.9.9" });
    expect(clientAddress(sent, 0)).toBe("198.51.100.4");
  });

  it("takes the address the trusted proxy saw, not what the client wrote before it", () => {
    const sent = headers({
      [PEER_ADDRESS_HEADER]: "10.0.0.2", // the proxy
      "x-forwarded-for": "1.1.1.1, 203.0.113.9", // client-written, then appended by the proxy
    });
    expect(clientAddress(sent, 1)).toBe("203.0.113.9");
    expect(clientAddress(sent, 2)).toBe("1.1.1.1");
  });

  it("falls back to the peer when the chain is shorter than the configured hops", () => {
    expect(clientAddress(headers({ [PEER_ADDRESS_HEADER]: "10.0.0.2" }), 3)).toBe("10.0.0.2");
  });

  it("reads an IPv4 client on a dual-stack socket as IPv4, and knows when it knows nothing", () => {
    expect(clientAddress(headers({ [PEER_ADDRESS_HEADER]: "::ffff:127.0.0.1" }), 0)).toBe(
      "127.0.0.1",
    );
    expect(clientAddress(headers({ "x-forwarded-for": "127.0.0.1" }), 0)).toBe(UNKNOWN_CLIENT);
  });
});

describe("isLoopback", () => {
  it.each([
    ["127.0.0.1", true],
    ["127.3.4.5", true],
    ["::1", true],
    ["[::1]", true],
    ["localhost", true],
    ["::ffff:127.0.0.1", true],
    ["0.0.0.0", false],
    ["::", false],
    ["192.168.1.10", false],
    ["unknown", false],
    [undefined, false],
  ])("%s → %s", (address, expected) => {
    expect(isLoopback(address)).toBe(expected);
  });
});
