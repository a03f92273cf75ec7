/** The identity provider's own pages, in Orrery's print-like navy and brass. */
const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

const STYLE = `
  :root { color-scheme: light; }
  * { box-sizing: border-box; }
  body { margin: 0; min-height: 100vh; display: grid; place-items: center; background: #f6f4ee;
         font: 15px/1.5 system-ui, -apple-system, "Segoe UI", sans-serif; color: #14213d; }
  main { width: min(24rem, 92vw); background: #fff; border: 1px solid #d8d2c2; border-top: 4px solid #b08d3c; padding: 2rem; }
  h1 { font-size: 1.15rem; margin: 0 0 .25rem; letter-spacing: .02em; }
  p.note { margin: 0 0 1.5rem; color: #4a5568; font-size: .9rem; }
  label { display: block; font-weight: 600; font-size: .85rem; margin: 1rem 0 .3rem; }
  input { width: 100%; padding: .55rem .6rem; border: 1px solid #9aa3b5; border-radius: 2px; font: inherit; color: inherit; }
  input:focus { outline: 2px solid #b08d3c; outline-offset: 1px; }
  button { margin-top: 1.5rem; width: 100%; padding: .6rem; border: 0; border-radius: 2px; background: #14213d; color: #fff; font: inherit; font-weight: 600; cursor: pointer; }
  button:focus-visible { outline: 2px solid #b08d3c; outline-offset: 2px; }
  .error { margin-top: 1rem; padding: .5rem .7rem; border-left: 3px solid #9b2c2c; background: #fdf2f2; color: #7b1f1f; font-size: .9rem; }
  .mark { font-weight: 700; letter-spacing: .12em; text-transform: uppercase; font-size: .75rem; color: #b08d3c; margin-bottom: 1rem; }
`;

export function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escape(title)}</title><style>${STYLE}</style></head><body><main>${body}</main></body></html>`;
}

export function signInPage(input: { uid: string; email?: string; error?: string; fresh: boolean }): string {
  const lead = input.fresh
    ? 'Confirm it is you: enter your password again to sign.'
    : 'Sign in with your organisation account.';
  return page(
    'Sign in — identity service',
    `<div class="mark">Identity service (local)</div>
     <h1>Sign in to Orrery</h1>
     <p class="note">${escape(lead)}</p>
     <form method="post" action="/interaction/${escape(input.uid)}/login" autocomplete="on">
       <label for="email">E-mail</label>
       <input id="email" name="email" type="email" required ${input.email ? '' : 'autofocus'} value="${escape(input.email ?? '')}">
       <label for="password">Password</label>
       <input id="password" name="password" type="password" required ${input.email ? 'autofocus' : ''}>
       ${input.error ? `<div class="error" role="alert">${escape(input.error)}</div>` : ''}
       <button type="submit">Sign in</button>
     </form>`,
  );
}

export function signOutPage(form: string): string {
  return page(
    'Signing out — identity service',
    `<div class="mark">Identity service (local)</div>
     <h1>Signing you out…</h1>
     ${form}
     <button type="submit" form="op.logoutForm" name="logout" value="yes">Sign out</button>
     <script>document.forms[0] && (function (f) { var i = document.createElement('input'); i.type = 'hidden'; i.name = 'logout'; i.value = 'yes'; f.appendChild(i); f.submit(); })(document.getElementById('op.logoutForm'));</script>`,
  );
}
