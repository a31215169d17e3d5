/** The states of an email_log row: queued → sending → sent; failed (will retry) → dead (gave up, or refused for good); skipped (switched off meanwhile). */
export const EMAIL_STATUSES = ["queued", "sending", "sent", "failed", "dead", "skipped"] as const;
