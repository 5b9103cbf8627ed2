// The shared Rainprint e-mail layout: real HTML (table layout and inline
// styles, which mail programs render reliably) and a plain-text twin. No
// external images, fonts or trackers.

export type RenderedMail = { subject: string; html: string; text: string };

export function escapeHtml(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");
}

/** A block of the message body: a paragraph, a button, or a small print line. */
export type Block =
  | { kind: "p"; text: string }
  | { kind: "button"; label: string; url: string }
  | { kind: "small"; text: string };

const INK = "#151b25";
const MUTED = "#56677d";
const TARN = "#1b6a72";
const PAPER = "#fbfcfd";
const RULE = "#cbd3dc";

export function layout(opts: { subject: string; heading: string; preheader: string; blocks: Block[]; appUrl: string }): RenderedMail {
  const { subject, heading, preheader, blocks, appUrl } = opts;
  const htmlBlocks = blocks
    .map((b) => {
      switch (b.kind) {
        case "p":
          return `<p style="margin:0 0 16px 0;font-size:16px;line-height:1.5;color:${INK};">${escapeHtml(b.text)}</p>`;
        case "small":
          return `<p style="margin:0 0 12px 0;font-size:13px;line-height:1.5;color:${MUTED};">${escapeHtml(b.text)}</p>`;
        case "button":
          return `<table role="presentation" cellspacing="0" cellpadding="0" border="0" style="margin:8px 0 24px 0;"><tr><td style="background:${TARN};border-radius:4px;"><a href="${escapeHtml(b.url)}" style="display:inline-block;padding:12px 20px;font-size:16px;font-weight:600;color:#ffffff;text-decoration:none;">${escapeHtml(b.label)}</a></td></tr></table>
<p style="margin:0 0 16px 0;font-size:13px;line-height:1.5;color:${MUTED};">If the button does not work, copy this address into your browser:<br><a href="${escapeHtml(b.url)}" style="color:${TARN};word-break:break-all;">${escapeHtml(b.url)}</a></p>`;
      }
    })
    .join("\n");
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>${escapeHtml(subject)}</title></head>
<body style="margin:0;padding:0;background:${PAPER};font-family:'IBM Plex Sans',Helvetica,Arial,sans-serif;">
<span style="display:none;max-height:0;overflow:hidden;">${escapeHtml(preheader)}</span>
<table role="presentation" width="100%" cellspacing="0" cellpadding="0" border="0" style="background:${PAPER};"><tr><td align="center" style="padding:24px 12px;">
<table role="presentation" width="100%" cellspacing="0" cellpadding="0" border="0" style="max-width:560px;background:#ffffff;border:1px solid ${RULE};border-radius:6px;">
<tr><td style="padding:20px 28px;border-bottom:3px solid ${TARN};"><span style="font-size:18px;font-weight:700;letter-spacing:0.02em;color:${INK};">Rainprint</span></td></tr>
<tr><td style="padding:28px;">
<h1 style="margin:0 0 20px 0;font-size:22px;line-height:1.3;color:${INK};">${escapeHtml(heading)}</h1>
${htmlBlocks}
</td></tr>
<tr><td style="padding:16px 28px;border-top:1px solid ${RULE};font-size:12px;line-height:1.5;color:${MUTED};">Rainprint — quality-checked precipitation isotope data and isoscapes.<br><a href="${escapeHtml(appUrl)}" style="color:${MUTED};">${escapeHtml(appUrl)}</a></td></tr>
</table></td></tr></table></body></html>`;

  const textBlocks = blocks
    .map((b) => {
      switch (b.kind) {
        case "p":
        case "small":
          return b.text;
        case "button":
          return `${b.label}:\n${b.url}`;
      }
    })
    .join("\n\n");
  const text = `RAINPRINT\n\n${heading}\n${"=".repeat(Math.min(heading.length, 60))}\n\n${textBlocks}\n\n--\nRainprint — quality-checked precipitation isotope data and isoscapes.\n${appUrl}\n`;
  return { subject, html, text };
}
