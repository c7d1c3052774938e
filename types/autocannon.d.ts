// autocannon 9 ships no type declarations: the part of its API the load test uses
// (scripts/bench/load-test.ts), as its README documents it.
declare module "autocannon" {
  interface Client {
    setHeaders(headers: Record<string, string>): void;
  }
  interface Options {
    url: string;
    connections?: number;
    /** Requests in all; overrides a duration. */
    amount?: number;
    /** Seconds before a request counts as timed out. */
    timeout?: number;
    setupClient?: (client: Client) => void;
  }
  interface Result {
    errors: number;
    timeouts: number;
    non2xx: number;
  }
  interface Instance extends PromiseLike<Result> {
    on(
      event: "response",
      listener: (client: Client, statusCode: number, bytes: number, responseTime: number) => void,
    ): void;
    stop(): void;
  }
  function autocannon(options: Options): Instance;
  export default autocannon;
}
