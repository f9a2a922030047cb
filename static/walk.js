// Survey walk: save a finding without losing it on a poor connection.
// The form carries an idempotency key, so sending it again after a dropped connection
// stores one finding. The page says plainly whether the save reached the server.
"use strict";

document.addEventListener("DOMContentLoaded", () => {
  const form = document.querySelector("form[data-finding]");
  const status = document.getElementById("save-status");
  if (!form || !status || !window.fetch) {
    return;
  }
  const buttons = form.querySelectorAll("button");
  const show = (state, message) => {
    status.dataset.state = state;
    status.textContent = message;
  };
  form.addEventListener("submit", async (event) => {
    event.preventDefault();
    buttons.forEach((button) => { button.disabled = true; });
    show("saving", "Saving… keep this page open.");
    let answer;
    try {
      // The button pressed is part of the form ("Checked: save as found" confirms).
      const body = new FormData(form, event.submitter);
      answer = await fetch(form.action, { method: "POST", body, credentials: "same-origin" });
    } catch (error) {
      buttons.forEach((button) => { button.disabled = false; });
      show("failed", "Not saved: the server could not be reached. Your entry is still here. " +
        "Tap Save again when the connection is back; it will be stored once.");
      return;
    }
    if (answer.redirected) {
      window.location.assign(answer.url);
      return;
    }
    // The server answered with the form and its messages: show that page as it is.
    form.submit();
  });
});
