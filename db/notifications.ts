import "server-only";
import { Client } from "pg";
import { env } from "@/lib/env";

// PostgreSQL's LISTEN/NOTIFY, for processes that wait on each other through the database (the parts
// of an analysis shared by several workers and their coordinator): a notification wakes the waiter
// within milliseconds where a poll would look every few tens of them. Notifications are hints, never
// the data: a waiter always reads the rows themselves, and looks again after a timeout in case a
// notification was lost (sent while this process was reconnecting).

type Listener = (payload: string) => void;

/** A connection of its own: a pooled one would be handed to other queries between notifications. */
const holder = globalThis as typeof globalThis & {
  partitaListening?: {
    client: Promise<Client>;
    /** Per channel, its listeners and the LISTEN command's completion. */
    channels: Map<string, { listeners: Set<Listener>; listening: Promise<unknown> }>;
    closing: boolean;
  };
};

/** After a lost connection, how long before listening again (waiters poll meanwhile). */
const RECONNECT_DELAY_MS = 1000;

function listening() {
  holder.partitaListening ??= { client: connect(), channels: new Map(), closing: false };
  return holder.partitaListening;
}

function connect(): Promise<Client> {
  const client = new Client({
    connectionString: env().DATABASE_URL,
    application_name: "partita-notifications",
  });
  client.on("notification", ({ channel, payload }) => {
    for (const listener of holder.partitaListening?.channels.get(channel)?.listeners ?? []) {
      listener(payload ?? "");
    }
  });
  const connected = client.connect().then(async () => {
    for (const channel of holder.partitaListening?.channels.keys() ?? []) {
      await client.query(`LISTEN ${quoteChannel(channel)}`);
    }
    return client;
  });
  let lost = false;
  const reconnect = () => {
    const state = holder.partitaListening;
    if (lost || !state || state.closing) return;
    lost = true;
    client.removeAllListeners();
    // Without an error listener a later error event would crash the process.
    client.on("error", () => {});
    client.end().catch(() => {});
    setTimeout(() => {
      if (state.closing || holder.partitaListening !== state) return;
      state.client = connect();
      state.client.catch(() => {});
    }, RECONNECT_DELAY_MS).unref();
  };
  client.on("error", (error) => {
    console.error(`[database] lost the notification connection (${error.message}); reconnecting`);
    reconnect();
  });
  client.on("end", reconnect);
  connected.catch(reconnect);
  return connected;
}

/**
 * Calls `listener` with the payload of every notification on `channel` from now until the returned
 * function is called. Resolves once PostgreSQL listens, so a notification sent after that reaches it.
 */
export async function listen(channel: string, listener: Listener): Promise<() => void> {
  const state = listening();
  let entry = state.channels.get(channel);
  if (!entry) {
    const listeners = new Set<Listener>();
    const listened = state.client.then((client) => client.query(`LISTEN ${quoteChannel(channel)}`));
    entry = { listeners, listening: listened };
    state.channels.set(channel, entry);
    // A connection lost meanwhile listens again once it is back (connect); waiters poll until then.
    listened.catch(() => {});
  }
  entry.listeners.add(listener);
  const { listeners } = entry;
  await entry.listening.catch(() => {});
  return () => {
    listeners.delete(listener);
  };
}

/** Ends the notification connection; tests and scripts call it (through closeDb) to exit. */
export async function stopListening(): Promise<void> {
  const state = holder.partitaListening;
  if (!state) return;
  state.closing = true;
  holder.partitaListening = undefined;
  const client = await state.client.catch(() => null);
  await client?.end().catch(() => {});
}

/** Channel names are identifiers; ours are fixed lower-case words, quoted all the same. */
function quoteChannel(channel: string): string {
  return `"${channel.replaceAll('"', '""')}"`;
}
