import type { CaughtMessage } from './catcher';

const escapeHtml = (s: string): string =>
  s.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c,
  );

/** The catcher's one page: newest message first, plain text body shown, HTML body sandboxed. */
export function renderMessagesPage(messages: CaughtMessage[], info: { smtpPort: number }): string {
  const items = [...messages]
    .reverse()
    .map(
      (m) => `
      <article>
        <header>
          <h2>${escapeHtml(m.subject || '(no subject)')}</h2>
          <dl>
            <dt>To</dt><dd>${escapeHtml(m.to.join(', ') || m.envelope.to.join(', '))}</dd>
            <dt>From</dt><dd>${escapeHtml(m.from ?? m.envelope.from ?? '')}</dd>
            <dt>Received</dt><dd><time datetime="${m.receivedAt}">${escapeHtml(m.receivedAt)}</time></dd>
          </dl>
        </header>
        <pre>${escapeHtml(m.text)}</pre>
        ${
          m.html
            ? `<details><summary>HTML version</summary><iframe sandbox title="HTML version" srcdoc="${escapeHtml(m.html)}"></iframe></details>`
            : ''
        }
      </article>`,
    )
    .join('\n');
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<link rel="icon" href="data:,">
<title>Mail catcher (development only)</title>
<style>
  body { font-family: "Noto Sans", system-ui, sans-serif; margin: 0; color: #1c2430; background: #f6f7f9; }
  .banner { background: #7a2e0e; color: #fff; padding: 0.6rem 1rem; font-weight: 600; }
  main { max-width: 56rem; margin: 0 auto; padding: 1rem; }
  article { background: #fff; border: 1px solid #d5d9e0; border-radius: 6px; padding: 0.8rem 1rem; margin-bottom: 1rem; }
  h1 { font-size: 1.3rem; } h2 { font-size: 1.05rem; margin: 0 0 0.4rem; }
  dl { display: grid; grid-template-columns: max-content 1fr; gap: 0.1rem 0.8rem; margin: 0; font-size: 0.9rem; }
  dt { color: #5a6473; } dd { margin: 0; }
  pre { white-space: pre-wrap; font-family: inherit; border-top: 1px solid #e3e6eb; padding-top: 0.6rem; }
  iframe { width: 100%; min-height: 16rem; border: 1px solid #d5d9e0; background: #fff; }
  .empty { color: #5a6473; }
  form { display: inline; }
</style>
</head>
<body>
<div class="banner" role="alert">Development only. Nothing shown here was delivered to anyone: this page catches the mail Ebbtide sends in development and tests.</div>
<main>
  <h1>Caught messages (${messages.length})</h1>
  <p>SMTP on port ${info.smtpPort}. JSON: <a href="/messages">/messages</a>. Reload to see new mail.</p>
  ${items || '<p class="empty">No messages yet.</p>'}
</main>
</body>
</html>`;
}
