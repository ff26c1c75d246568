// Outgoing e-mail through nodemailer (the mail catcher locally, the studio's SMTP server in production).
import nodemailer, { type Transporter } from 'nodemailer';
import { config } from './config';

let transport: Transporter | undefined;

function transporter(): Transporter {
  if (!transport) {
    const s = config.smtp;
    transport = nodemailer.createTransport({
      host: s.host,
      port: s.port,
      secure: s.secure,
      ignoreTLS: !s.secure && !s.user,
      auth: s.user ? { user: s.user, pass: s.pass ?? '' } : undefined,
    });
  }
  return transport;
}

export interface Message {
  to: string;
  subject: string;
  /** Plain-text body; the HTML body is built from the same paragraphs. */
  paragraphs: string[];
  /** A call-to-action link shown as a button in HTML and as a bare URL in text. */
  action?: { label: string; url: string };
}

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/**
 * Escapes a paragraph for HTML. Only links into this app (a note's frame link, a digest line) become anchors: text a
 * person typed (a share message, a guest's note or name) never turns into a link, whatever URL it holds.
 */
function paragraphHtml(p: string): string {
  const app = `${config.appUrl}/`;
  return p
    .split(/(https?:\/\/[^\s<>"]+)/g)
    .map((part, i) => (i % 2 === 1 && part.startsWith(app) ? `<a href="${escape(part)}" style="color:#0d7a78">${escape(part)}</a>` : escape(part)))
    .join('');
}

/** Renders a message to plain text and HTML in Tidemark's own plain layout. */
export function render(m: Message): { text: string; html: string } {
  const text = [...m.paragraphs, ...(m.action ? [`${m.action.label}: ${m.action.url}`] : []), '— Tidemark'].join('\n\n');
  const html = `<!doctype html><html><body style="font-family:'Space Grotesk',Arial,sans-serif;background:#f4f1ea;color:#13232b;padding:24px">
<div style="max-width:560px;margin:auto;background:#fff;border-radius:10px;padding:24px;border-top:6px solid #0d7a78">
<p style="font-weight:700;letter-spacing:.04em;color:#0d7a78;margin-top:0">TIDEMARK</p>
${m.paragraphs.map((p) => `<p>${paragraphHtml(p)}</p>`).join('\n')}
${m.action ? `<p><a href="${escape(m.action.url)}" style="display:inline-block;background:#0d7a78;color:#fff;padding:10px 16px;border-radius:6px;text-decoration:none">${escape(m.action.label)}</a></p><p style="font-size:12px;color:#5b6b72">${escape(m.action.url)}</p>` : ''}
</div></body></html>`;
  return { text, html };
}

export async function sendMail(m: Message): Promise<void> {
  const { text, html } = render(m);
  await transporter().sendMail({ from: config.smtp.from, to: m.to, subject: m.subject, text, html });
}
