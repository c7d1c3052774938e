const formatter = new Intl.DateTimeFormat("en-GB", {
  dateStyle: "medium",
  timeStyle: "medium",
  timeZone: "UTC",
});

/** Arrival times in UTC, so the server's time zone never changes what the page shows. */
export function formatReceivedAt(time: Date): string {
  return `${formatter.format(time)} UTC`;
}
