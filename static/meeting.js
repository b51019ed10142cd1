// The meeting view: left and right arrow keys go to the previous and next
// situation (the address holds the position, so a link opens on the same
// screen).
(function () {
  "use strict";
  document.addEventListener("keydown", function (ev) {
    var t = ev.target;
    if (t && (t.tagName === "TEXTAREA" || t.tagName === "INPUT" || t.tagName === "SELECT")) { return; }
    var id = ev.key === "ArrowRight" ? "next" : (ev.key === "ArrowLeft" ? "prev" : null);
    if (!id) { return; }
    var a = document.getElementById(id);
    if (a) { ev.preventDefault(); window.location.href = a.href; }
  });
})();
