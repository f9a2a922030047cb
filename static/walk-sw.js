// The survey walk's service worker (served at /surveys/walk-sw.js, scope /surveys/).
// Walk pages: from the network when there is one (and kept), else as last kept, so a
// technician can walk a round with no connection. Static files: kept by fingerprint.
// It never touches a POST: saves go through walk.js, which keeps them in an outbox.
"use strict";

const PAGES = "traptally-walk-pages-v1";
const FILES = "traptally-walk-files-v1";
const WALK_PAGE = /^\/surveys\/\d+\/walk(\/traps\/\d+)?$/;

self.addEventListener("install", () => self.skipWaiting());
self.addEventListener("activate", (event) => event.waitUntil(self.clients.claim()));

self.addEventListener("fetch", (event) => {
  const request = event.request;
  const url = new URL(request.url);
  if (request.method !== "GET" || url.origin !== self.location.origin) {
    return;
  }
  if (url.pathname.startsWith("/static/")) {
    event.respondWith(keptFirst(request));
  } else if (WALK_PAGE.test(url.pathname)) {
    event.respondWith(networkFirst(request, url));
  }
});

async function keptFirst(request) {
  const files = await caches.open(FILES);
  const kept = await files.match(request);
  if (kept) {
    return kept;
  }
  const answer = await fetch(request);
  if (answer.ok) {
    files.put(request, answer.clone());
  }
  return answer;
}

async function networkFirst(request, url) {
  const pages = await caches.open(PAGES);
  const key = url.origin + url.pathname; // ?saved=, ?area= are views of one page
  try {
    const answer = await fetch(request);
    if (answer.ok && !answer.redirected && url.search === "") {
      pages.put(key, answer.clone());
    }
    return answer;
  } catch (error) {
    const kept = await pages.match(key);
    return kept || notKept();
  }
}

function notKept() {
  const page = "<!doctype html><html lang=\"en\"><meta charset=\"utf-8\">" +
    "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">" +
    "<title>Not on this tablet</title><main style=\"font: 1.1rem system-ui; padding: 1rem\">" +
    "<h1>No connection, and this page is not kept on this tablet</h1>" +
    "<p>Open the survey walk while connected to keep its traps for working offline. " +
    "Findings saved on this tablet are kept until they are sent.</p>" +
    "<p>Go back with the browser's Back button.</p></main></html>";
  return new Response(page, { status: 503, headers: { "Content-Type": "text/html; charset=utf-8" } });
}
