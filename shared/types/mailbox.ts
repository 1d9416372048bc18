/** One message the local SMTP sink received, as `GET /dev/mailbox.json` lists it. */
export interface SinkMessage {
  id: number;
  /** The To header (or the envelope recipients when it is missing). */
  to: string;
  from: string;
  subject: string;
  text: string;
  html: string;
  /** When the sink received it (ISO 8601, UTC). */
  date: string;
}
