import "server-only";
import { headers } from "next/headers";
import { env } from "@/lib/env";
import { clientAddress } from "./client-address";

/** The address of whoever sent the current request (server actions, route handlers). */
export async function requestClientAddress(): Promise<string> {
  return clientAddress(await headers(), env().TRUSTED_PROXY_HOPS);
}
