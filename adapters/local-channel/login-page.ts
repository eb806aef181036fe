// The sign-in page shown when the local channel needs an access token: one field, posted as a
// form (no script, so the page's content security policy needs no exception).
export function loginPage(nonce: string, problem?: string): string {
  return `<!doctype html>
<html lang="en">
<head>
  <meta charset="utf-8">
  <meta name="viewport" content="width=device-width, initial-scale=1">
  <title>threadcount: sign in</title>
  <link rel="icon" href="/favicon.svg" type="image/svg+xml">
  <link rel="stylesheet" href="/style.css">
</head>
<body>
  <main class="sign-in">
    <h1>threadcount</h1>
    <p>This channel needs its access token (the value of THREADCOUNT_ACCESS_TOKEN where the bot runs).</p>
    ${problem ? `<p class="error" role="alert">${escapeHtml(problem)}</p>` : ''}
    <form method="post" action="/login">
      <input type="hidden" name="nonce" value="${escapeHtml(nonce)}">
      <label for="token">Access token</label>
      <input id="token" name="token" type="password" autocomplete="current-password" required autofocus>
      <button type="submit" class="primary">Sign in</button>
    </form>
  </main>
</body>
</html>
`;
}

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}
