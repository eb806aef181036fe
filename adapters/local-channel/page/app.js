// The local channel page: plain JavaScript, no build step. It talks only to the documented API:
// POST /api/threads, POST /api/threads/:id/messages, GET /api/threads(/:id), the thread's
// event stream, and /api/threads/:id/files/:file for attachments.
'use strict';

const $ = (id) => document.getElementById(id);
const state = { threadId: null, messages: new Map(), nodes: new Map(), source: null };

// ---------- small DOM helpers (text only: nothing from the server is parsed as HTML) ----------

function el(tag, attrs = {}, ...children) {
  const node = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === null || v === false) continue;
    if (k === 'class') node.className = v;
    else if (k === 'text') node.textContent = v;
    else if (k.startsWith('on')) node.addEventListener(k.slice(2), v);
    else node.setAttribute(k, v === true ? '' : String(v));
  }
  for (const c of children.flat()) if (c !== null && c !== undefined) node.append(c);
  return node;
}

/** Light markdown from the bot: *bold*, _italic_, lines starting "- " as a list. */
function renderText(text) {
  const out = document.createDocumentFragment();
  let list = null;
  for (const line of text.split('\n')) {
    const item = /^\s*[-•]\s+(.*)$/.exec(line);
    if (item) {
      if (!list) out.append((list = el('ul')));
      list.append(el('li', {}, inline(item[1])));
      continue;
    }
    list = null;
    if (line.trim() === '') continue;
    out.append(el('p', {}, inline(line)));
  }
  return out;
}

function inline(line) {
  const frag = document.createDocumentFragment();
  // An italic span may hold underscores of its own (booking_id); it ends at "_" before a space or the end.
  const re = /\*([^*\n]+)\*|(^|[\s(])_(\S.*?)_(?=$|[\s).,;:!?])/g;
  let at = 0;
  for (let m; (m = re.exec(line)); ) {
    const lead = m[2] ?? '';
    frag.append(line.slice(at, m.index) + lead);
    frag.append(m[1] !== undefined ? el('strong', { text: m[1] }) : el('em', { text: m[3] }));
    at = m.index + m[0].length;
  }
  frag.append(line.slice(at));
  return frag;
}

function time(iso) {
  const d = new Date(iso);
  return el('time', { datetime: iso, title: d.toLocaleString() }, d.toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' }));
}

function size(bytes) {
  return bytes < 1024 ? `${bytes} B` : bytes < 1048576 ? `${(bytes / 1024).toFixed(1)} KB` : `${(bytes / 1048576).toFixed(1)} MB`;
}

// ---------- the API ----------

function author() {
  return $('author').value.trim() || 'you';
}

// When the server asks for an access token, the page signed in and got a CSRF cookie: each
// POST sends it back as a header (another site's page cannot read it).
function csrfHeader() {
  const m = /(?:^|;\s*)tc_csrf=([^;]+)/.exec(document.cookie);
  return m ? { 'x-csrf-token': m[1] } : {};
}

async function api(path, body) {
  const res = await fetch(path, body ? { method: 'POST', headers: { 'content-type': 'application/json', ...csrfHeader() }, body: JSON.stringify(body) } : {});
  if (res.status === 401) {
    // Signed out (the token changed): sign in again, then come back here.
    location.assign('/login');
    throw new Error('signed out');
  }
  const data = await res.json().catch(() => ({}));
  if (!res.ok) throw new Error(data.error || `${res.status} ${res.statusText}`);
  return data;
}

function showError(err) {
  const box = $('error');
  box.textContent = err ? `Could not send: ${err.message}` : '';
  box.hidden = !err;
}

/** Sends a reply; a click sends its value as `text` and what was chosen as `label`, which the thread shows. */
async function reply(text, label) {
  if (!state.threadId) return;
  showError(null);
  try {
    await api(`/api/threads/${encodeURIComponent(state.threadId)}/messages`, { author: author(), text, ...(label ? { label } : {}) });
  } catch (err) {
    showError(err);
  }
}

// ---------- the thread list ----------

// At most one refresh in flight per 80 ms: a burst of messages still refreshes promptly.
let listTimer = null;
function refreshList() {
  if (listTimer) return;
  listTimer = setTimeout(async () => {
    listTimer = null;
    const { threads } = await api('/api/threads').catch(() => ({ threads: [] }));
    const list = $('thread-list');
    list.replaceChildren(
      ...threads.map((t) =>
        el(
          'li',
          {},
          el(
            'a',
            { class: 'req', href: `#/t/${encodeURIComponent(t.id)}`, 'aria-current': t.id === state.threadId ? 'page' : null, 'data-stage': t.stage },
            el('span', { class: 't-title', text: t.title || 'Untitled request' }),
            el('span', { class: 't-meta' }, el('span', { text: t.author || 'someone' }), time(t.createdAt), t.waiting ? el('span', { class: 't-waiting', text: 'waiting for you' }) : null),
            stageTrack(t.stage),
          ),
        ),
      ),
    );
    $('no-threads').hidden = threads.length > 0;
    const open = threads.find((t) => t.id === state.threadId);
    if (open) $('thread-stage').replaceWith(stageTrack(open.stage, 'thread-stage'));
  }, 80);
}

// Where a request stands; the server names it (thread-stage.ts). A cancelled one is "closed".
const STAGES = [
  ['asking', 'asking'],
  ['plan', 'plan'],
  ['running', 'running'],
  ['done', 'done'],
];

/** The four steps of a request, those passed ticked and the current one filled. */
function stageTrack(stage, id) {
  const closed = stage === 'closed';
  const at = STAGES.findIndex(([s]) => s === stage);
  const track = el(
    'ol',
    { class: `stages${closed ? ' closed' : ''}`, id, 'aria-label': `Stage: ${closed ? 'closed' : stage}`, 'data-stage': stage },
    STAGES.map(([s, label], i) => el('li', { class: i < at ? 'past' : i === at ? `now ${s}` : null, 'aria-current': i === at ? 'step' : null, text: label })),
    closed ? el('li', { class: 'closed-note', text: 'cancelled' }) : null,
  );
  return track;
}

// ---------- one message ----------

/** How a file's kind is named on its download link; the zip of a whole thread is "ZIP". */
const FILE_KIND_LABEL = { table: 'CSV', bundle: 'ZIP' };

function renderMessage(m, index) {
  const isRequest = index === 0 && !m.fromBot;
  const body = el(
    'div',
    { class: 'body' },
    el('div', { class: 'text' }, renderText(m.prompt ? m.prompt.lead : (m.label ?? m.text))),
  );
  const meta = el('div', { class: 'meta' }, el('span', { class: 'author', text: m.author }), time(m.createdAt), m.updatedAt ? el('span', { class: 'edited', text: 'updated' }) : null);
  if (m.prompt) body.append(renderPrompt(m.prompt));
  if (m.controls) body.append(renderControls(m.controls));
  if (m.quickReplies) {
    body.append(el('div', { class: 'quick' }, m.quickReplies.map((q) => el('button', { type: 'button', class: q.primary ? 'primary' : null, 'data-value': q.value, onclick: () => reply(q.value, q.label) }, q.label))));
  }
  const images = m.files.filter((f) => f.contentType === 'image/png');
  const others = m.files.filter((f) => f.contentType !== 'image/png');
  if (images.length) {
    body.append(
      el(
        'div',
        { class: 'charts' },
        images.map((f) =>
          el(
            'figure',
            {},
            el('button', { type: 'button', class: 'open-chart', title: 'Open the chart full-screen', onclick: () => showChart(f) }, el('img', { src: f.url, alt: `Chart: ${f.name}`, width: f.width, height: f.height, loading: 'lazy' })),
            el('figcaption', {}, el('span', { text: f.name }), el('a', { href: f.url, download: f.name, text: 'Download PNG' })),
          ),
        ),
      ),
    );
  }
  if (others.length) {
    body.append(
      el(
        'ul',
        { class: 'files' },
        others.map((f) =>
          el('li', { class: f.kind === 'bundle' ? 'bundle' : null }, el('a', { href: f.url, download: f.name }, el('span', { class: 'kind', text: FILE_KIND_LABEL[f.kind] ?? f.kind.toUpperCase() }), el('span', { text: f.name }), el('span', { class: 'size', text: size(f.bytes) }))),
        ),
      ),
    );
  }
  return el('article', { class: `msg ${m.fromBot ? 'bot' : 'person'}${isRequest ? ' request' : ''}`, 'data-id': m.id, 'data-kind': m.kind }, meta, body);
}

// ---------- a chart full-screen ----------

function showChart(f) {
  const view = $('chart-view');
  const img = $('chart-view-img');
  img.onload = () => fitChart();
  img.src = f.url;
  img.alt = `Chart: ${f.name}`;
  $('chart-view-name').textContent = f.name;
  $('chart-view-png').href = f.url;
  view.showModal();
  fitChart();
  $('chart-view-close').focus();
}

/**
 * A wide chart on an upright phone screen is drawn turned a quarter, as large as the screen's
 * height allows: read with the phone turned, it is about twice the size it would be upright.
 */
function fitChart() {
  const view = $('chart-view');
  const img = $('chart-view-img');
  const body = img.parentElement;
  const aspect = (img.naturalWidth || 16) / (img.naturalHeight || 9);
  const w = body.clientWidth - 16;
  const h = body.clientHeight - 16;
  const turn = view.open && h > w * 1.3 && aspect > 1.2 && Math.min(h, w * aspect) > w * 1.25;
  img.classList.toggle('turned', turn);
  view.classList.toggle('is-turned', turn);
  if (turn) {
    const long = Math.min(h, w * aspect);
    img.style.width = `${Math.floor(long)}px`;
    img.style.height = `${Math.floor(long / aspect)}px`;
  } else {
    img.style.width = '';
    img.style.height = '';
  }
}

/** An ISO day in words, as the server says it in a reply's label ("Thu 10 Dec 2026"). */
function dayInWords(iso) {
  const d = new Date(`${iso}T12:00:00Z`);
  if (Number.isNaN(d.getTime())) return iso;
  return new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(d).replace(',', '');
}

/**
 * A prompt's choices. One choice: a button each, the recommended one marked. Several: toggles with
 * the recommendation already on and "Send selected", so one click accepts it (as on Slack and Discord).
 */
function renderPrompt(p) {
  const isOption = p.options.some((o) => o.value === p.recommended.value);
  const options = isOption ? p.options : [...p.options, { value: p.recommended.value, label: p.recommended.label }];
  const chosen = new Set(p.many ? [p.recommended.value] : []);
  const send = el('button', { type: 'button', class: 'primary send-choices' });
  const label = () => options.filter((o) => chosen.has(o.value)).map((o) => o.label).join(', ');
  const refreshSend = () => {
    send.disabled = chosen.size === 0;
    send.textContent = chosen.size > 1 ? `Send ${chosen.size} selected` : 'Send selected';
  };
  const buttons = options.map((o) => {
    const isRec = o.value === p.recommended.value;
    const b = el(
      'button',
      { type: 'button', class: isRec ? 'recommended' : null, 'data-value': o.value, 'aria-pressed': p.many ? String(chosen.has(o.value)) : null },
      o.label,
      isRec ? el('span', { class: 'tag', text: 'recommended' }) : null,
    );
    b.addEventListener('click', () => {
      if (!p.many) return reply(o.value, o.label);
      if (chosen.has(o.value)) chosen.delete(o.value);
      else chosen.add(o.value);
      b.setAttribute('aria-pressed', String(chosen.has(o.value)));
      refreshSend();
    });
    return b;
  });
  refreshSend();
  send.addEventListener('click', () => reply(options.filter((o) => chosen.has(o.value)).map((o) => o.value).join(', '), label()));
  const box = el('div', { class: 'prompt', 'data-topic': p.topic }, el('div', { class: 'choices' }, buttons, p.many ? send : null));
  if (p.topic === 'deadline') {
    const input = el('input', { type: 'date', 'aria-label': 'Deadline date' });
    box.append(el('div', { class: 'date-choice' }, 'or pick a date', input, el('button', { type: 'button', onclick: () => input.value && reply(input.value, dayInWords(input.value)) }, 'Send date')));
  }
  box.append(el('p', { class: 'rec' }, 'Recommended: ', el('strong', { text: p.recommended.label }), ` (${p.recommended.reason}).`, p.many ? ' Pick one or more and send; the recommended one is already picked.' : '', ' Or type your own answer below.'));
  return box;
}

/** The brief card's controls: a select per topic showing the choice in force, a date for the deadline. Choosing sends at once. */
function renderControls(controls) {
  const rows = controls.map((c) => {
    const id = `ctl-${c.topic}-${Math.random().toString(36).slice(2, 8)}`;
    let input;
    if (c.kind === 'date') {
      input = el('input', { type: 'date', id, value: /^\d{4}-\d{2}-\d{2}$/.test(c.current ?? '') ? c.current : null });
      input.addEventListener('change', () => {
        if (!input.value) return;
        reply((c.sends ?? `${c.topic} {date}`).replaceAll('{date}', input.value), `${c.label}: ${dayInWords(input.value)}`);
      });
    } else {
      const known = c.choices.some((o) => o.value === c.current);
      input = el(
        'select',
        { id },
        known ? null : el('option', { value: '', selected: true, disabled: true, text: 'Choose…' }),
        c.choices.map((o) => el('option', { value: o.value, selected: o.value === c.current, text: o.label })),
      );
      input.addEventListener('change', () => {
        const o = c.choices.find((x) => x.value === input.value);
        if (o) reply(o.value, `${c.label}: ${o.label}`);
      });
    }
    input.dataset.topic = c.topic;
    return el('div', { class: 'control' }, el('label', { for: id, text: c.label }), input);
  });
  return el('div', { class: 'controls' }, rows);
}

/**
 * The bot message still waiting for an answer: the newest one offering something to click, unless
 * a later reply answered it (one of its options or quick replies). A reminder, help or status
 * after it leaves it live; a card stays live while it has controls. The server's `openMessage`
 * (local-thread-log.ts) applies the same rule for the list's "waiting for you".
 */
function openMessage(ordered) {
  let at = -1;
  for (let i = ordered.length - 1; i >= 0 && at < 0; i--) {
    const m = ordered[i];
    if (m.fromBot && (m.prompt || m.quickReplies?.length || m.controls?.length)) at = i;
  }
  if (at < 0) return undefined;
  const m = ordered[at];
  const answers = new Set([...(m.prompt?.options ?? []), ...(m.prompt ? [m.prompt.recommended] : []), ...(m.quickReplies ?? [])].map((o) => o.value.toLowerCase()));
  const said = (x) => x.text.trim().toLowerCase();
  const answered = ordered.slice(at + 1).some((x) => !x.fromBot && (answers.has(said(x)) || (!!m.prompt && said(x).split(/\s*,\s*/).every((v) => answers.has(v)))));
  // A request cancelled after it waits for nothing.
  const cancelled = ordered.slice(at + 1).some((x) => x.fromBot && x.kind === 'cancelled');
  return answered || cancelled ? undefined : m;
}

/** Only the message waiting for an answer can be answered by clicking; earlier ones are kept but inert. */
function refreshActive() {
  const ordered = [...state.messages.values()];
  const open = openMessage(ordered);
  ordered.forEach((m, i) => {
    const node = state.nodes.get(m.id);
    const active = open !== undefined && open.id === m.id;
    // What the person said next is the answer; mark the matching choices.
    const answer = ordered.slice(i + 1).find((x) => !x.fromBot);
    const picked = new Set((answer?.text ?? '').toLowerCase().split(/\s*,\s*/));
    for (const part of node.querySelectorAll('.prompt, .quick, .controls')) {
      part.classList.toggle('answered', !active);
      for (const c of part.querySelectorAll('button, input, select')) {
        c.disabled = !active || (c.classList.contains('send-choices') && !part.querySelector('[aria-pressed="true"]'));
        if (c.dataset.value !== undefined) c.classList.toggle('chosen', !active && picked.has(c.dataset.value.toLowerCase()));
      }
    }
  });
  // The bot owes a reply when a person spoke last.
  const last = ordered.at(-1);
  $('working').hidden = !last || last.fromBot;
  placeReply(open);
}

/** The reply box goes under the entry waiting for an answer, else after the last entry. */
function placeReply(open) {
  const under = open ? state.nodes.get(open.id) : undefined;
  for (const n of state.nodes.values()) n.classList.toggle('waiting', n === under);
  $('reply-label').textContent = !open ? 'Your reply' : open.prompt ? 'Your answer, if none of the choices above' : open.controls?.length ? 'Go, or change the plan in your own words' : 'Your reply';
  const form = $('reply-form');
  const after = under ?? $('working');
  if (form.previousElementSibling === after) return;
  const hadFocus = document.activeElement === $('reply-text');
  after.after(form);
  if (hadFocus) $('reply-text').focus();
}

function upsert(m) {
  const known = state.messages.has(m.id);
  state.messages.set(m.id, m);
  const index = [...state.messages.keys()].indexOf(m.id);
  const node = renderMessage(m, index);
  const old = state.nodes.get(m.id);
  if (old) old.replaceWith(node);
  else $('messages').append(node);
  state.nodes.set(m.id, node);
  refreshActive();
  // An edit moves the stage too (a card agreed is running).
  refreshList();
  if (!known) node.scrollIntoView({ block: 'nearest', behavior: matchMedia('(prefers-reduced-motion: reduce)').matches ? 'auto' : 'smooth' });
}

// ---------- views ----------

function openThread(id) {
  if (state.source) state.source.close();
  state.threadId = id;
  state.messages.clear();
  state.nodes.clear();
  $('messages').replaceChildren();
  $('compose-view').hidden = true;
  $('thread-view').hidden = false;
  document.body.classList.add('in-thread');
  $('thread-view').append($('reply-form'));
  $('thread-stage').replaceWith(stageTrack('asking', 'thread-stage'));
  $('working').hidden = true;
  // The thread's own address, stable across restarts (thread ids are kept with the thread log).
  $('thread-link').href = `${location.origin}${location.pathname}#/t/${encodeURIComponent(id)}`;
  // The stream replays the thread from its first event, then follows it.
  const source = new EventSource(`/api/threads/${encodeURIComponent(id)}/events`);
  for (const type of ['message.created', 'message.updated']) source.addEventListener(type, (e) => upsert(JSON.parse(e.data)));
  state.source = source;
  refreshList();
  $('reply-text').focus();
}

function openCompose() {
  if (state.source) state.source.close();
  state.source = null;
  state.threadId = null;
  $('thread-view').hidden = true;
  $('compose-view').hidden = false;
  document.body.classList.remove('in-thread');
  refreshList();
  $('request-text').focus();
}

function route() {
  const m = /^#\/t\/(.+)$/.exec(location.hash);
  if (m) openThread(decodeURIComponent(m[1]));
  else openCompose();
}

// ---------- forms ----------

function submitOnEnter(textarea, form) {
  textarea.addEventListener('keydown', (e) => {
    if (e.key === 'Enter' && !e.shiftKey && !e.isComposing) {
      e.preventDefault();
      form.requestSubmit();
    }
  });
}

$('request-form').addEventListener('submit', async (e) => {
  e.preventDefault();
  const text = $('request-text').value.trim();
  if (!text) return;
  showError(null);
  try {
    const { threadId } = await api('/api/threads', { author: author(), text });
    $('request-text').value = '';
    location.hash = `#/t/${encodeURIComponent(threadId)}`;
  } catch (err) {
    showError(err);
  }
});

$('reply-form').addEventListener('submit', async (e) => {
  e.preventDefault();
  const text = $('reply-text').value.trim();
  if (!text) return;
  $('reply-text').value = '';
  await reply(text);
});

function bindExample(b) {
  b.addEventListener('click', () => {
    $('request-text').value = b.textContent;
    $('request-text').focus();
  });
}

// The starters are the served data's own (starters.ts, the same list serve's hint comes from); the
// page has none built in, so it never offers another dataset's questions, even for a moment.
fetch('/api/starters', { headers: { accept: 'application/json' } })
  .then((r) => (r.ok ? r.json() : null))
  .then((body) => {
    if (!body || !Array.isArray(body.starters) || body.starters.length === 0) return;
    const box = document.querySelector('.examples');
    for (const text of body.starters) {
      const b = document.createElement('button');
      b.type = 'button';
      b.className = 'example';
      b.textContent = text;
      bindExample(b);
      box.appendChild(b);
    }
    box.hidden = false;
    $('request-text').placeholder = `e.g. ${body.starters[0]}`;
  })
  .catch(() => undefined);

$('author').value = localStorage.getItem('threadcount.author') || 'you';
$('author').addEventListener('change', () => localStorage.setItem('threadcount.author', author()));
submitOnEnter($('request-text'), $('request-form'));
submitOnEnter($('reply-text'), $('reply-form'));
$('chart-view-close').addEventListener('click', () => $('chart-view').close());
// A click on the dark edge around the chart closes it too; Escape closes a dialog by itself.
$('chart-view').addEventListener('click', (e) => e.target === $('chart-view') && $('chart-view').close());
window.addEventListener('resize', () => $('chart-view').open && fitChart());
window.addEventListener('hashchange', route);
route();
