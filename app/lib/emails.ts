// The words and layout of Dipwell's e-mails. Each message has a plain-text and
// an HTML part; the HTML is deliberately simple so it reads well in any client.

export type MailContent = { subject: string; text: string; html: string };

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/** Wraps paragraphs and one call-to-action link in Dipwell's e-mail layout. */
export function layout(opts: {
  subject: string;
  greeting: string;
  paragraphs: string[];
  action?: { label: string; url: string };
  footer?: string;
  extraHtml?: string;
}): MailContent {
  const { subject, greeting, paragraphs, action, footer } = opts;
  const text = [
    greeting,
    "",
    ...paragraphs.flatMap((p) => [p, ""]),
    ...(action ? [`${action.label}: ${action.url}`, ""] : []),
    "— Dipwell, hot tub water care",
    ...(footer ? ["", footer] : []),
  ].join("\n");
  const html = `<!doctype html><html><body style="margin:0;background:#f4f7f6;font-family:'Atkinson Hyperlegible',Verdana,sans-serif;color:#14302c">
<div style="max-width:560px;margin:0 auto;padding:24px">
<p style="font-size:20px;font-weight:bold;color:#0f5c54;margin:0 0 16px">Dipwell</p>
<div style="background:#ffffff;border-radius:12px;padding:24px;line-height:1.5;font-size:16px">
<p>${escapeHtml(greeting)}</p>
${paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join("\n")}
${opts.extraHtml ?? ""}
${action ? `<p style="margin:24px 0"><a href="${escapeHtml(action.url)}" style="background:#0f5c54;color:#ffffff;padding:12px 20px;border-radius:8px;text-decoration:none;font-weight:bold">${escapeHtml(action.label)}</a></p><p style="font-size:13px;color:#4a625e">Or open this address: ${escapeHtml(action.url)}</p>` : ""}
</div>
${footer ? `<p style="font-size:13px;color:#4a625e;margin-top:16px">${escapeHtml(footer)}</p>` : ""}
</div></body></html>`;
  return { subject, text, html };
}

export function verifyEmailMail(name: string, url: string): MailContent {
  return layout({
    subject: "Confirm your e-mail address for Dipwell",
    greeting: `Hello ${name},`,
    paragraphs: [
      "Welcome to Dipwell. Please confirm that this is your e-mail address so we can send you reminders about your tub.",
      "If you did not create a Dipwell account, you can ignore this message.",
    ],
    action: { label: "Confirm my e-mail address", url },
  });
}

export function resetPasswordMail(name: string, url: string): MailContent {
  return layout({
    subject: "Reset your Dipwell password",
    greeting: `Hello ${name},`,
    paragraphs: [
      "Someone asked to reset the password of your Dipwell account. The link below works for one hour.",
      "If it was not you, ignore this message: your password stays as it is.",
    ],
    action: { label: "Choose a new password", url },
  });
}
