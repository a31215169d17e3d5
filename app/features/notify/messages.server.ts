// The words of Dipwell's reminder e-mails. Each has a plain-text and an HTML
// part (app/lib/emails.ts layout), a link back to the right screen, and a
// one-click way to stop that kind of message (List-Unsubscribe headers, RFC
// 2369 and RFC 8058, plus a link in the footer).
import sharp from "sharp";
import { analyteWord } from "../../chemistry/analytes";
import { formatDateTime, formatDay } from "../../lib/dates";
import { layout, type MailContent } from "../../lib/emails";
import { env } from "../../lib/env.server";
import type { OutgoingEmail } from "./outbox.server";
import { MESSAGE_KINDS, type DueReminder, type MessageKind } from "./schedule";

export type Recipient = { id: string; name: string; email: string; unsubscribeToken: string; timeZone: string };

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

export const appUrl = (path: string) => new URL(path, env().PUBLIC_URL).toString();
export const unsubscribeUrl = (token: string, kind: MessageKind) => appUrl(`/unsubscribe/${encodeURIComponent(token)}/${kind}`);

/** Adds the "why you get this / stop these" footer and the List-Unsubscribe headers to a message. */
export function withUnsubscribe(content: MailContent, kind: MessageKind, token: string): MailContent & { headers: Record<string, string> } {
  const stop = unsubscribeUrl(token, kind);
  const settings = appUrl("/settings/notifications");
  const text = `${content.text}\n\nYou get this e-mail because "${MESSAGE_KINDS[kind]}" is on.\nStop these e-mails: ${stop}\nChoose what Dipwell sends: ${settings}\n`;
  const footer = `<p style="font-size:13px;color:#4a625e;margin-top:16px">You get this e-mail because &ldquo;${escapeHtml(MESSAGE_KINDS[kind])}&rdquo; is on.
<a href="${escapeHtml(stop)}" style="color:#0f5c54">Stop these e-mails</a> · <a href="${escapeHtml(settings)}" style="color:#0f5c54">Choose what Dipwell sends</a></p>`;
  const html = content.html.replace(/<\/div><\/body><\/html>$/, `${footer}\n</div></body></html>`);
  return {
    subject: content.subject, text, html,
    headers: { "List-Unsubscribe": `<${stop}>`, "List-Unsubscribe-Post": "List-Unsubscribe=One-Click" },
  };
}

/** A time in the recipient's zone, saying which zone, so no sentence leaves the reader guessing. */
function formatLocal(iso: string, timeZone: string) {
  return `${formatDateTime(iso, "en-GB", timeZone)} (${timeZone.replace(/_/g, " ")} time)`;
}

export type WeekReading = { takenAt: Date; analyte: string; value: number };

/** A small trend picture of the week: one line per measure, each scaled to its own range. PNG via sharp. */
export async function sparklinePng(readings: WeekReading[], weekStart: Date, weekEnd: Date): Promise<Buffer | null> {
  const W = 480, H = 120, pad = 10;
  const series = [
    { analytes: ["free_chlorine", "bromine"], colour: "#0f5c54" },
    { analytes: ["ph"], colour: "#c07a12" },
  ];
  const span = Math.max(1, weekEnd.getTime() - weekStart.getTime());
  const lines: string[] = [];
  for (const s of series) {
    const pts = readings.filter((r) => s.analytes.includes(r.analyte)).sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
    if (pts.length === 0) continue;
    const min = Math.min(...pts.map((p) => p.value)), max = Math.max(...pts.map((p) => p.value));
    const range = max - min || 1;
    const xy = pts.map((p) => {
      const x = pad + ((p.takenAt.getTime() - weekStart.getTime()) / span) * (W - 2 * pad);
      const y = max === min ? H / 2 : H - pad - ((p.value - min) / range) * (H - 2 * pad);
      return [x.toFixed(1), y.toFixed(1)];
    });
    lines.push(`<polyline fill="none" stroke="${s.colour}" stroke-width="3" stroke-linejoin="round" points="${xy.map((p) => p.join(",")).join(" ")}"/>`);
    lines.push(...xy.map(([x, y]) => `<circle cx="${x}" cy="${y}" r="4" fill="${s.colour}"/>`));
  }
  if (lines.length === 0) return null;
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">
<rect width="${W}" height="${H}" rx="8" fill="#f4f7f6"/>
<line x1="${pad}" y1="${H - pad}" x2="${W - pad}" y2="${H - pad}" stroke="#c9d6d3" stroke-width="1"/>
${lines.join("\n")}</svg>`;
  return sharp(Buffer.from(svg)).png().toBuffer();
}


/** The e-mail (and in-app notification) for one due reminder. */
export async function reminderEmail(r: DueReminder, to: Recipient, week: WeekReading[] = []): Promise<OutgoingEmail> {
  const d = r.detail as Record<string, string>;
  const tubUrl = appUrl(`/tubs/${r.tubId}`);
  const greeting = `Hello ${to.name},`;
  let content: MailContent;
  let note: { title: string; body: string };
  let attachments: OutgoingEmail["attachments"];
  switch (r.kind) {
    case "retest": {
      note = { title: `Time to retest ${d.tubName}`, body: `The wait after adding ${d.productName} has ended. Test the water before adding anything else.` };
      content = layout({
        subject: note.title, greeting,
        paragraphs: [
          `The wait after adding ${d.productName} to ${d.tubName} has ended.`,
          "Dip a fresh test strip now to see where the water is before you add anything else. Never add a second product while the first is still mixing, and never dose with anyone in the tub.",
        ],
        action: { label: "Test the water now", url: tubUrl },
      });
      break;
    }
    case "test_due": {
      const last = d.lastTestedAt ? `The last test was on ${formatLocal(d.lastTestedAt, to.timeZone)}.` : "There is no test on record yet.";
      note = { title: `${d.tubName}: a water test is due`, body: `Your routine is a test every ${d.everyDays} days. ${last}` };
      content = layout({
        subject: note.title, greeting,
        paragraphs: [`Your routine for ${d.tubName} is a water test every ${d.everyDays} days. ${last}`, "A quick strip test keeps the water safe and comfortable."],
        action: { label: "Test the water", url: tubUrl },
      });
      break;
    }
    case "drain_due": {
      note = { title: `${d.tubName}: time to drain and refill`, body: `Filled on ${formatDay(String(d.fillDate), "en-GB")}; water like this is usually changed about every ${d.intervalDays} days.` };
      content = layout({
        subject: note.title, greeting,
        paragraphs: [
          `${d.tubName} was filled on ${formatDay(String(d.fillDate), "en-GB")}. For its volume and use, the water is usually changed about every ${d.intervalDays} days: dissolved solids build up and the water gets harder to keep balanced.`,
          "Switch off the power to the heater and pumps before draining, follow the tub maker's manual and local rules for where the water may go, and record the new fill date in Dipwell afterwards.",
        ],
        action: { label: "Open the tub", url: tubUrl },
      });
      break;
    }
    case "weekly_summary": {
      const start = new Date(d.weekStart), end = new Date(d.weekEnd);
      const tests = new Set(week.map((w) => w.takenAt.getTime())).size;
      const latest = (names: string[]) => week.filter((w) => names.includes(w.analyte)).sort((a, b) => b.takenAt.getTime() - a.takenAt.getTime())[0];
      const san = latest(["free_chlorine", "bromine"]), ph = latest(["ph"]);
      const latestLine = [san && `${analyteWord(san.analyte)} ${san.value} ppm`, ph && `pH ${ph.value}`].filter(Boolean).join(", ");
      const summary = tests === 0
        ? "There were no water tests this week."
        : `${tests} water test${tests === 1 ? "" : "s"} this week.${latestLine ? ` Latest: ${latestLine}.` : ""}`;
      note = { title: `${d.tubName}: your week in water`, body: summary };
      const png = await sparklinePng(week, start, end);
      const cid = `trend-${r.tubId}@dipwell`;
      if (png) attachments = [{ filename: "trend.png", contentType: "image/png", cid, contentBase64: png.toString("base64") }];
      content = layout({
        subject: note.title, greeting,
        paragraphs: [
          `Here is the week of ${formatLocal(d.weekStart, to.timeZone)} to ${formatLocal(d.weekEnd, to.timeZone)} for ${d.tubName}.`,
          summary,
          ...(png ? ["The picture shows the sanitiser (green) and pH (amber) across the week, each on its own scale."] : []),
        ],
        extraHtml: png ? `<p><img src="cid:${cid}" width="480" height="120" alt="Trend of sanitiser and pH this week" style="max-width:100%;height:auto"/></p>` : "",
        action: { label: "See the trends", url: tubUrl },
      });
      break;
    }
  }
  const full = withUnsubscribe(content, r.kind, to.unsubscribeToken);
  return {
    kind: r.kind, to: to.email, userId: to.id, tubId: r.tubId, dedupeKey: r.dedupeKey,
    subject: full.subject, text: full.text, html: full.html, headers: full.headers, attachments,
    notification: { ...note, link: `/tubs/${r.tubId}` },
  };
}

/**
 * A technician invitation e-mail ready for enqueueEmail(). `token` is the
 * recipient's unsubscribe token when they already have an account (then the
 * message carries a one-click stop link); new addresses get none.
 */
export function invitationEmail(opts: {
  invitationId: string; to: string; tubName: string; inviterName: string; acceptUrl: string;
  /** how long the invitation works */
  validDays?: number;
  recipient?: { id: string; name: string; unsubscribeToken: string } | null;
}): OutgoingEmail {
  const content = layout({
    subject: `${opts.inviterName} invited you to look after ${opts.tubName}`,
    greeting: opts.recipient ? `Hello ${opts.recipient.name},` : "Hello,",
    paragraphs: [
      `${opts.inviterName} would like you to look after the water in ${opts.tubName} on Dipwell, as their technician: you will see its readings, treatments and notes and can review unsure readings.`,
      `${opts.validDays ? `The invitation works for ${opts.validDays} days. ` : ""}Sign in with a technician account at this e-mail address to accept it.`,
      "If you do not know them, ignore this message: nothing changes until you accept.",
    ],
    action: { label: "See the invitation", url: opts.acceptUrl },
  });
  const full = opts.recipient ? withUnsubscribe(content, "invitation", opts.recipient.unsubscribeToken) : { ...content, headers: undefined };
  return {
    kind: "invitation", to: opts.to, userId: opts.recipient?.id ?? null, dedupeKey: `invitation:${opts.invitationId}`,
    subject: full.subject, text: full.text, html: full.html, headers: full.headers,
    notification: opts.recipient ? { title: full.subject, body: "Open the invitation to accept or decline it.", link: new URL(opts.acceptUrl).pathname } : undefined,
  };
}


/** Tells a tub's owner that their technician reviewed an unsure reading, with any corrections. */
export function reviewedEmail(opts: {
  readingId: string; tubId: string; tubName: string; takenAt: Date; timeZone: string; technicianName: string;
  /** "Free chlorine: 1 → 3 mg/L", one per corrected pad */
  changes: string[];
  recipient: { id: string; name: string; email: string; unsubscribeToken: string };
}): OutgoingEmail {
  const when = formatLocal(opts.takenAt.toISOString(), opts.timeZone);
  const outcome = opts.changes.length
    ? `${opts.technicianName} corrected ${opts.changes.length === 1 ? "one value" : `${opts.changes.length} values`}: ${opts.changes.join("; ")}.`
    : `${opts.technicianName} confirmed the values as the reader saw them.`;
  const note = { title: `${opts.tubName}: your reading was reviewed`, body: `The reading of ${when}. ${outcome}` };
  const url = appUrl(`/tubs/${opts.tubId}/readings/${opts.readingId}`);
  const content = layout({
    subject: note.title,
    greeting: `Hello ${opts.recipient.name},`,
    paragraphs: [
      `The reader was unsure about some pads of your reading of ${opts.tubName} taken ${when}, so your technician checked it.`,
      outcome,
      "The treatment plan now uses the reviewed values. Open the tub to see the next safe step.",
    ],
    action: { label: "See the reading", url },
  });
  const full = withUnsubscribe(content, "reviewed", opts.recipient.unsubscribeToken);
  return {
    kind: "reviewed", to: opts.recipient.email, userId: opts.recipient.id, tubId: opts.tubId, dedupeKey: `reviewed:${opts.readingId}`,
    subject: full.subject, text: full.text, html: full.html, headers: full.headers,
    notification: { ...note, link: `/tubs/${opts.tubId}/readings/${opts.readingId}` },
  };
}
