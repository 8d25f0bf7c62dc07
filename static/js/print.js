// Print buttons: any element with a data-print attribute prints the page when pressed.
// The button ships hidden and is shown here, so without this script no dead button shows
// (the page tells people to use the browser's Print command instead). Kept in a file, not
// an onclick= attribute, because the pages run under a Content-Security-Policy without
// 'unsafe-inline'.
"use strict";

document.querySelectorAll("[data-print]").forEach((button) => {
  button.hidden = false;
  button.addEventListener("click", () => window.print());
});
