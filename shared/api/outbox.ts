export interface OutboxMessage {
  id: number;
  to: string;
  subject: string;
  text: string;
  receivedAt: string;
  /** http(s) links found in the text part, in order. */
  links: string[];
}
export interface OutboxResponse {
  messages: OutboxMessage[];
}
