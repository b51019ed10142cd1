// Film notes and cut-up lists on any table of snaps: rows that carry
// data-game and data-seq get a "Note" button that opens a small form to
// write a note and put the snap on a named cut-up list (new or existing).
// Everything goes through /api/notes and /api/cutups; text is inserted as
// text, never as HTML.
(function () {
  "use strict";
  function el(tag, attrs, text) {
    var e = document.createElement(tag);
    Object.keys(attrs || {}).forEach(function (k) { e.setAttribute(k, attrs[k]); });
    if (text !== undefined) { e.textContent = text; }
    return e;
  }
  function send(method, url, body) {
    return fetch(url, {
      method: method,
      headers: { "Content-Type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
      credentials: "same-origin"
    }).then(function (r) {
      if (r.status === 204) { return null; }
      return r.json().then(function (j) {
        if (!r.ok) { throw new Error(j.error || ("HTTP " + r.status)); }
        return j;
      });
    });
  }
  function keyOf(game, seq) { return game + "\u0000" + seq; }

  var notesBySnap = {};
  var lists = [];

  function refresh() {
    return Promise.all([send("GET", "/api/notes"), send("GET", "/api/cutups")]).then(function (r) {
      if (r[0].off) { throw new Error(r[0].off); }
      notesBySnap = {};
      r[0].notes.forEach(function (n) {
        var k = keyOf(n.game, n.seq);
        (notesBySnap[k] = notesBySnap[k] || []).push(n);
      });
      lists = r[1].lists;
    });
  }

  function label(row) {
    var n = (notesBySnap[keyOf(row.dataset.game, row.dataset.seq)] || []).length;
    return n === 0 ? "Note" : (n === 1 ? "1 note" : n + " notes");
  }

  function openForm(row, button) {
    var next = row.nextElementSibling;
    if (next && next.classList.contains("note-form-row")) { next.remove(); return; }
    var game = row.dataset.game, seq = parseInt(row.dataset.seq, 10);
    var tr = el("tr", { "class": "note-form-row" });
    var td = el("td", { colspan: String(row.children.length) });
    var form = el("form", { "class": "note-form" });
    var existing = notesBySnap[keyOf(game, seq)] || [];
    if (existing.length) {
      var ul = el("ul", { "class": "note-list" });
      existing.forEach(function (n) { ul.appendChild(el("li", {}, n.text)); });
      form.appendChild(ul);
    }
    var textLabel = el("label", {}, "Note for the film room ");
    var text = el("textarea", { name: "text", rows: "2", maxlength: "1000", "class": "note-text" });
    textLabel.appendChild(text);
    form.appendChild(textLabel);
    var listLabel = el("label", {}, "Put on cut-up list ");
    var select = el("select", { name: "list", "class": "note-list-choice" });
    select.appendChild(el("option", { value: "" }, "(none)"));
    lists.slice().sort(function (a, b) { return a.name.localeCompare(b.name); }).forEach(function (l) {
      select.appendChild(el("option", { value: String(l.id) }, l.name + " (" + l.count + ")"));
    });
    select.appendChild(el("option", { value: "new" }, "New list..."));
    listLabel.appendChild(select);
    form.appendChild(listLabel);
    var newName = el("input", { type: "text", name: "new_list", maxlength: "80", placeholder: "New list name", "class": "note-new-list", hidden: "" });
    form.appendChild(newName);
    select.addEventListener("change", function () { newName.hidden = select.value !== "new"; });
    var save = el("button", { type: "submit", "class": "note-save" }, "Save");
    form.appendChild(save);
    var status = el("span", { "class": "note-status", role: "status" });
    form.appendChild(status);
    form.addEventListener("submit", function (ev) {
      ev.preventDefault();
      var jobs = [];
      var snap = { game: game, seq: seq };
      if (text.value.trim() !== "") { jobs.push(send("POST", "/api/notes", { game: game, seq: seq, text: text.value })); }
      if (select.value === "new") {
        jobs.push(send("POST", "/api/cutups", { name: newName.value, snaps: [snap] }));
      } else if (select.value !== "") {
        jobs.push(send("PATCH", "/api/cutups/" + select.value, { add: [snap] }));
      }
      if (!jobs.length) { status.textContent = "Write a note or choose a list."; return; }
      status.textContent = "Saving...";
      Promise.all(jobs).then(refresh).then(function () {
        status.textContent = "Saved.";
        text.value = "";
        button.textContent = label(row);
      }).catch(function (e) { status.textContent = "Not saved: " + e.message; });
    });
    td.appendChild(form);
    tr.appendChild(td);
    row.parentNode.insertBefore(tr, row.nextSibling);
    text.focus();
  }

  function enhance(table) {
    var head = table.tHead && table.tHead.rows[0];
    if (head) { head.appendChild(el("th", { scope: "col" }, "Film")); }
    Array.prototype.forEach.call(table.querySelectorAll("tbody tr[data-game]"), function (row) {
      var td = el("td", { "class": "film" });
      var b = el("button", { type: "button", "class": "note-open", "aria-label": "Note or cut-up for this snap" }, label(row));
      b.addEventListener("click", function () { openForm(row, b); });
      td.appendChild(b);
      row.appendChild(td);
    });
  }

  function deleteButtons() {
    Array.prototype.forEach.call(document.querySelectorAll("button[data-delete-url]"), function (b) {
      b.addEventListener("click", function () {
        if (!window.confirm(b.getAttribute("data-confirm") || "Delete?")) { return; }
        send("DELETE", b.getAttribute("data-delete-url")).then(function () { window.location.reload(); })
          .catch(function (e) { window.alert("Not deleted: " + e.message); });
      });
    });
  }

  document.addEventListener("DOMContentLoaded", function () {
    deleteButtons();
    var tables = document.querySelectorAll("table[data-notes]");
    if (!tables.length) { return; }
    refresh().then(function () {
      Array.prototype.forEach.call(tables, enhance);
    }).catch(function () { /* notes are off: the tables stay as they are */ });
  });
})();
