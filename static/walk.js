// Survey walk: save a finding without losing it, with or without a connection.
// Online, a save goes straight to the server and the next page reads it back from the
// database. With no connection (or a signed-out session), the finding is kept in this
// tablet's outbox (IndexedDB) with its idempotency key, the walk goes on to the next
// trap from the pages the service worker kept, and the outbox sends each finding once
// when the connection is back; the server stores a key's finding once, however often
// it is sent. Every page still works without this script.
"use strict";

const OUTBOX = { database: "traptally", store: "outbox" };

function outboxStore(mode) {
  return new Promise((resolve, reject) => {
    const opening = indexedDB.open(OUTBOX.database, 1);
    opening.onupgradeneeded = () => opening.result.createObjectStore(OUTBOX.store, { keyPath: "key" });
    opening.onerror = () => reject(opening.error);
    opening.onsuccess = () => resolve(opening.result.transaction(OUTBOX.store, mode).objectStore(OUTBOX.store));
  });
}

function asked(request) {
  return new Promise((resolve, reject) => {
    request.onsuccess = () => resolve(request.result);
    request.onerror = () => reject(request.error);
  });
}

const outbox = {
  all: async () => asked((await outboxStore("readonly")).getAll()),
  put: async (entry) => asked((await outboxStore("readwrite")).put(entry)),
  remove: async (key) => asked((await outboxStore("readwrite")).delete(key)),
};

// A new key for each showing of a form: a page kept on the tablet is shown many times.
function newKey() {
  const bytes = crypto.getRandomValues(new Uint8Array(16));
  return Array.from(bytes, (b) => b.toString(16).padStart(2, "0")).join("");
}

function nowUtc() {
  return new Date().toISOString().replace(/\.\d+Z$/, "Z");
}

const panel = {
  element: () => document.getElementById("outbox"),
  say(text) {
    const element = this.element();
    if (!element) return;
    document.getElementById("outbox-message").textContent = text;
    element.hidden = !text;
  },
};

async function showOutbox(extra) {
  const entries = await outbox.all();
  const waiting = entries.filter((entry) => !entry.problem);
  const problems = entries.filter((entry) => entry.problem);
  const twice = repeatedTraps(waiting);
  const lines = [];
  if (extra) lines.push(extra);
  if (waiting.length && signedOut) {
    const count = waiting.length;
    lines.push(`Your sign-in has ended: ${count} finding${count > 1 ? "s" : ""} wait on this tablet. Sign in and they are sent.`);
  } else if (waiting.length) {
    lines.push(`${waiting.length} waiting to send${navigator.onLine ? "" : " when the connection is back"}.`);
  }
  panel.say(lines.join(" "));
  const list = document.getElementById("outbox-problems");
  if (!list) return;
  list.replaceChildren();
  for (const entry of problems) {
    list.append(problemItem(entry, `${entry.tag}: not accepted. ${entry.problem}`, "Discard it", [entry]));
  }
  for (const [tag, same] of twice) {
    const older = same.slice(0, -1);
    list.append(problemItem(same[0], `${tag} was recorded ${same.length} times on this tablet. Send only the latest?`, "Keep only the latest", older));
  }
  if (problems.length || twice.size) panel.element().hidden = false;
  document.getElementById("outbox-send").hidden = !waiting.length || !navigator.onLine;
}

function problemItem(entry, text, action, dropped) {
  const item = document.createElement("li");
  const link = document.createElement("a");
  link.href = entry.action;
  link.textContent = text;
  const button = document.createElement("button");
  button.type = "button";
  button.className = "secondary";
  button.textContent = action;
  button.addEventListener("click", async () => {
    for (const each of dropped) await outbox.remove(each.key);
    await showOutbox();
    send();
  });
  item.append(link, " ", button);
  return item;
}

// Traps with more than one finding waiting: a decision before any of them is sent.
function repeatedTraps(waiting) {
  const byTrap = new Map();
  for (const entry of waiting.sort((a, b) => a.keptAt - b.keptAt)) {
    byTrap.set(entry.action, [...(byTrap.get(entry.action) || []), entry]);
  }
  const twice = new Map();
  for (const same of byTrap.values()) {
    if (same.length > 1) twice.set(same[0].tag, same);
  }
  return twice;
}

async function sessionToken() {
  try {
    const answer = await fetch("/api/v1/session", { credentials: "same-origin" });
    if (answer.status === 401) return null;
    return answer.ok ? (await answer.json()).csrf_token : undefined;
  } catch (error) {
    return undefined; // no connection
  }
}

let sending = false;
let signedOut = false; // the server sent a save to sign in: the outbox waits for it

async function send() {
  if (sending || !navigator.onLine) return;
  sending = true;
  try {
    const waiting = (await outbox.all()).filter((entry) => !entry.problem);
    const twice = new Set([...repeatedTraps(waiting).values()].flat().map((entry) => entry.key));
    const ready = waiting.filter((entry) => !twice.has(entry.key));
    if (!ready.length) return;
    const token = await sessionToken();
    if (token === null) {
      askToSignIn();
      return;
    }
    if (token === undefined) return;
    for (const entry of ready) {
      if (!(await sendOne(entry, token))) break;
    }
  } finally {
    sending = false;
    await showOutbox();
  }
}

// One finding to the server; false when the rest must wait (no connection, signed out).
async function sendOne(entry, token) {
  const body = new FormData();
  for (const [name, value] of entry.fields) body.append(name, value);
  body.set("csrf_token", token);
  let answer;
  try {
    answer = await fetch(entry.action, { method: "POST", body, credentials: "same-origin" });
  } catch (error) {
    return false;
  }
  const landed = new URL(answer.url);
  if (landed.pathname === "/sign-in") {
    askToSignIn();
    return false;
  }
  if (answer.redirected && landed.searchParams.has("saved")) {
    await outbox.remove(entry.key);
    return true;
  }
  const page = new DOMParser().parseFromString(await answer.text(), "text/html");
  const reason = page.querySelector("[role=alert], .error-summary, .notice");
  entry.problem = reason ? reason.textContent.replace(/\s+/g, " ").trim() : `answer ${answer.status}`;
  await outbox.put(entry);
  return true;
}

function askToSignIn() {
  signedOut = true;
  const link = document.getElementById("outbox-sign-in");
  if (!link) return;
  link.href = `/sign-in?next=${encodeURIComponent(location.pathname)}`;
  link.hidden = false;
}

// Keep a finding on the tablet, then go on to the next trap.
async function keep(form, body, why) {
  const entry = {
    key: body.get("idempotency_key"),
    action: form.getAttribute("action"),
    // A photo is kept too (IndexedDB holds files); an empty file input is not.
    fields: [...body.entries()].filter(([, value]) => typeof value === "string" || value.size > 0),
    tag: form.dataset.tag,
    condition: body.get("condition") || "",
    keptAt: Date.now(), // milliseconds: two saves in one second keep their order
    problem: "",
  };
  await outbox.put(entry);
  const chosen = form.querySelector("input[name=condition]:checked");
  const words = chosen ? chosen.closest("label").textContent.trim() : "no condition chosen";
  sessionStorage.setItem("traptally-kept", `${why} Kept on this tablet: ${entry.tag}, ${words}.`);
  location.assign(form.dataset.nextUrl);
}

function watchForm(form) {
  const status = document.getElementById("save-status");
  const show = (state, message) => {
    if (!status) return;
    status.dataset.state = state;
    status.textContent = message;
  };
  form.elements.idempotency_key.value = newKey();
  form.elements.opened_at.value = nowUtc();
  form.addEventListener("submit", async (event) => {
    event.preventDefault();
    // The button pressed is part of the form ("Checked: save as found" confirms).
    const body = new FormData(form, event.submitter);
    if (!navigator.onLine) {
      await keep(form, body, "No connection.");
      return;
    }
    form.querySelectorAll("button").forEach((button) => { button.disabled = true; });
    show("saving", "Saving… keep this page open.");
    let answer;
    try {
      answer = await fetch(form.action, { method: "POST", body, credentials: "same-origin" });
    } catch (error) {
      await keep(form, body, "The connection dropped.");
      return;
    }
    if (new URL(answer.url).pathname === "/sign-in") {
      await keep(form, body, "Your sign-in has ended.");
      return;
    }
    if (answer.redirected) {
      location.assign(answer.url);
      return;
    }
    form.submit(); // the server answered with the form and its messages: show them
  });
}

// Keep every page of the round on the tablet, a few at a time, saying how far it got;
// again after an hour (a walk page opened often costs the server nothing more).
const KEEP_AGAIN_MS = 3600 * 1000;

async function keepRound(line) {
  const stamp = `traptally-kept-at:${line.dataset.pages}`;
  if (Date.now() - Number(localStorage.getItem(stamp) || 0) < KEEP_AGAIN_MS) {
    line.hidden = false;
    line.textContent = "This round is kept on this tablet for working without a connection.";
    return;
  }
  let pages;
  try {
    pages = (await (await fetch(line.dataset.pages, { credentials: "same-origin" })).json()).pages;
  } catch (error) {
    return;
  }
  const kept = await caches.open("traptally-walk-pages-v1");
  let done = 0;
  line.hidden = false;
  const queue = [...pages];
  const worker = async () => {
    for (let url = queue.shift(); url; url = queue.shift()) {
      try {
        const answer = await fetch(url, { credentials: "same-origin" });
        if (answer.ok && !answer.redirected) await kept.put(new URL(url, location.href).href, answer);
      } catch (error) {
        return;
      }
      done += 1;
      if (done % 10 === 0 || done === pages.length) {
        line.textContent = `Kept on this tablet for working without a connection: ${done} of ${pages.length} pages.`;
      }
    }
  };
  await Promise.all([worker(), worker(), worker(), worker()]);
  if (done === pages.length) localStorage.setItem(stamp, String(Date.now()));
}

// Read a trap's QR label with the camera, where the browser offers barcode detection;
// typing the tag always works. The code holds the trap's address: the form takes it.
async function scanTag(form) {
  const viewfinder = document.getElementById("scanner");
  let stream;
  try {
    stream = await navigator.mediaDevices.getUserMedia({ video: { facingMode: "environment" } });
  } catch (error) {
    return; // no camera, or not allowed: the tag can be typed
  }
  viewfinder.srcObject = stream;
  viewfinder.hidden = false;
  await viewfinder.play();
  const detector = new BarcodeDetector({ formats: ["qr_code"] });
  const stop = () => {
    stream.getTracks().forEach((track) => track.stop());
    viewfinder.hidden = true;
  };
  const deadline = Date.now() + 60 * 1000;
  while (Date.now() < deadline) {
    const codes = await detector.detect(viewfinder).catch(() => []);
    if (codes.length) {
      stop();
      form.elements.tag.value = codes[0].rawValue;
      form.submit();
      return;
    }
    await new Promise((resolve) => setTimeout(resolve, 150));
  }
  stop();
}

document.addEventListener("DOMContentLoaded", async () => {
  const finder = document.querySelector("form[data-find-tag]");
  const scan = document.getElementById("scan-tag");
  if (finder && scan && "BarcodeDetector" in window && navigator.mediaDevices) {
    const formats = await BarcodeDetector.getSupportedFormats().catch(() => []);
    if (formats.includes("qr_code")) {
      scan.hidden = false;
      scan.addEventListener("click", () => scanTag(finder));
    }
  }
  if (!window.fetch || !window.indexedDB) return;
  if ("serviceWorker" in navigator) {
    navigator.serviceWorker.register("/surveys/walk-sw.js", { scope: "/surveys/" }).catch(() => {});
  }
  const form = document.querySelector("form[data-finding]");
  if (form) watchForm(form);
  const kept = sessionStorage.getItem("traptally-kept");
  sessionStorage.removeItem("traptally-kept");
  await showOutbox(kept);
  document.getElementById("outbox-send")?.addEventListener("click", send);
  window.addEventListener("online", () => { showOutbox(); send(); });
  window.addEventListener("offline", () => showOutbox());
  send();
  const line = document.getElementById("offline-ready");
  if (line && navigator.onLine && "caches" in window) keepRound(line);
});
