// The review page: the draft minutes beside the transcript, every edit saved as it is made.
//
// Everything shown comes from /api/state and is put on the page as text (textContent,
// createTextNode): captions are untrusted and may contain markup. No HTML string is ever parsed.
"use strict";

(function () {
  const KINDS = [
    { key: "motions", label: "Motions", one: "motion" },
    { key: "decisions", label: "Decisions", one: "decision" },
    { key: "actions", label: "Action items", one: "action" },
    { key: "questions", label: "Questions", one: "question" },
  ];
  const OUTCOMES = ["carried", "failed", "withdrawn", "tabled", "postponed", "referred", "pending"];
  const METHODS = ["none", "voice", "count", "roll_call", "consent"];
  const STATUSES = ["open", "done", "dropped"];
  const UNNAMED = /^(speaker|spk|unknown|participant|guest)[\s_-]*\d*$/i;

  let state = null; // {minutes, review, session}
  let selected = null; // id of the item whose evidence is highlighted
  let pendingSpans = null; // the transcript selection, as {utterance, from, to} pieces
  let saving = 0;
  const openForms = new Set();

  // ------------------------------------------------------------------ small helpers

  function el(tag, attrs, ...children) {
    const node = document.createElement(tag);
    for (const [key, value] of Object.entries(attrs || {})) {
      if (value === null || value === undefined || value === false) continue;
      if (key === "class") node.className = value;
      else if (key === "text") node.textContent = value;
      else if (key.startsWith("on")) node.addEventListener(key.slice(2), value);
      else if (key === "dataset") Object.assign(node.dataset, value);
      else node.setAttribute(key, value === true ? "" : String(value));
    }
    return add(node, ...children);
  }

  // Append children as nodes; strings become text nodes; null and false are skipped.
  function add(node, ...children) {
    for (const child of children.flat()) {
      if (child === null || child === undefined || child === false) continue;
      node.append(typeof child === "string" ? document.createTextNode(child) : child);
    }
    return node;
  }

  function clock(seconds) {
    const total = Math.max(0, Math.floor(Number(seconds) || 0));
    const h = Math.floor(total / 3600), m = Math.floor(total / 60) % 60, s = total % 60;
    return [h, m, s].map((n) => String(n).padStart(2, "0")).join(":");
  }

  function $(id) { return document.getElementById(id); }

  function unknownNames() {
    return new Set(state.minutes.unknown_speakers || []);
  }

  function isUnnamed(name) {
    return typeof name === "string" && name !== "" && (UNNAMED.test(name.trim()) || unknownNames().has(name));
  }

  function allItems() {
    const out = [];
    for (const kind of KINDS) for (const item of state.minutes[kind.key]) out.push([kind, item]);
    return out;
  }

  function findItem(id) {
    for (const [kind, item] of allItems()) if (item.id === id) return [kind, item];
    return [null, null];
  }

  // ------------------------------------------------------------------ talking to the server

  function setSaveStatus(text, kind) {
    const node = $("save-status");
    node.textContent = text;
    node.className = "save-status" + (kind ? " save-" + kind : "");
  }

  // Edits go one after another, so replies come back in the order the edits were made.
  let queue = Promise.resolve();

  function send(edit) {
    const next = queue.then(() => post(edit));
    queue = next.catch(() => null);
    return next;
  }

  async function post(edit) {
    saving += 1;
    setSaveStatus("Saving…", "busy");
    try {
      const response = await fetch("/api/edit", {
        method: "POST",
        headers: { "Content-Type": "application/json" },
        body: JSON.stringify(edit),
      });
      const payload = await response.json().catch(() => ({ error: "the server sent no answer" }));
      if (!response.ok) {
        setSaveStatus("Not saved: " + (payload.error || response.statusText), "error");
        return null;
      }
      state = payload;
      setSaveStatus("All changes saved at " + new Date().toLocaleTimeString(), "ok");
      return payload;
    } catch (err) {
      setSaveStatus("Not saved: the review server cannot be reached (" + err.message + ")", "error");
      return null;
    } finally {
      saving -= 1;
    }
  }

  async function load() {
    const response = await fetch("/api/state");
    if (!response.ok) throw new Error("the server answered " + response.status);
    state = await response.json();
  }

  // ------------------------------------------------------------------ checks for the clerk

  function checksFor(kind, item) {
    const checks = [];
    if (item.source === "llm") checks.push("Suggested by the language model: check it against the recording.");
    const people = {
      actions: [["owner", "Owner"]],
      decisions: [["by", "Decided by"]],
      motions: [["mover", "Mover"], ["seconder", "Seconder"]],
      questions: [["asked_by", "Asked by"]],
    }[kind.key];
    for (const [field, label] of people) {
      if (isUnnamed(item[field])) checks.push(label + " “" + item[field] + "” is not identified.");
    }
    for (const ev of item.evidence || []) {
      if (isUnnamed(ev.speaker)) {
        checks.push("Said by an unidentified speaker (“" + ev.speaker + "”).");
        break;
      }
    }
    if (kind.key === "actions" && !item.owner) checks.push("No owner named.");
    if (kind.key === "motions") {
      for (const flag of item.flags || []) checks.push(flag);
      const v = item.vote || {};
      if (v.for === null || v.against === null || v.abstain === null) {
        checks.push("Vote counts not recorded" + (v.method && v.method !== "none" ? " (" + v.method.replace("_", " ") + ")" : "") + ".");
      }
      if (!item.mover) checks.push("No mover heard.");
    }
    return checks;
  }

  // ------------------------------------------------------------------ the minutes column

  function renderMinutes() {
    const pane = $("minutes-pane");
    const keepScroll = pane.scrollTop;
    pane.replaceChildren();
    const m = state.minutes;
    const order = (m.template === "board" ? KINDS : [KINDS[1], KINDS[2], KINDS[0], KINDS[3]])
      .filter((kind) => kind.key !== "motions" || m.template === "board" || m.motions.length);
    pane.append(renderNav(m, order), renderHeader(m), renderAttendance(m), renderSpeakers(m), renderTopics(m));
    for (const kind of order) pane.append(renderSection(kind));
    pane.append(renderNotes(m));
    pane.scrollTop = keepScroll;
    renderProgress();
    renderPeopleList();
    if (selected) markSelected(selected, false);
  }

  function renderNav(m, order) {
    const link = (target, text) => el("li", {}, el("a", { href: "#" + target, text }));
    return el("nav", { class: "section-nav", "aria-label": "Sections" }, el("ul", {},
      link("meeting", "Meeting"), link("attendance", "Attendance"), link("speakers", "Speakers"),
      link("topics", "Topics"),
      order.map((kind) => link("section-" + kind.key, kind.label + " (" + m[kind.key].length + ")")),
      (m.notes || []).length ? link("notes", "Notes (" + m.notes.length + ")") : null));
  }

  function fact(label, value) {
    if (!value) return null;
    return el("div", { class: "fact" }, el("dt", { text: label }), el("dd", { text: value }));
  }

  function renderHeader(m) {
    const meeting = m.meeting;
    const title = meeting.title || state.session.minutes_file;
    document.title = "Review: " + title;
    $("doc-title").textContent = title;
    let time = clock(meeting.duration_s) + " recorded";
    if (meeting.start_clock) time = "started " + meeting.start_clock.slice(0, 5) + ", " + time;
    const q = m.quorum;
    return el("section", { class: "block", id: "meeting" },
      el("h2", { text: "Meeting" }),
      el("dl", { class: "facts" },
        fact("Body", meeting.body), fact("Kind", meeting.kind), fact("Date", meeting.date),
        fact("Place", meeting.place), fact("Time", time),
        fact("Quorum", q ? (q.met ? "present" : "NOT present") + " (" + q.present + " of " + q.members + "; " + q.required + " needed)" : ""),
        fact("Next meeting", meeting.next_meeting),
        fact("Draft from", meeting.source)));
  }

  function renderAttendance(m) {
    const present = m.attendees.filter((a) => a.present);
    const absent = m.attendees.filter((a) => !a.present);
    const person = (a) => el("li", { class: isUnnamed(a.name) ? "unnamed" : null },
      a.name, a.role ? el("span", { class: "role", text: " — " + a.role }) : null);
    return el("section", { class: "block", id: "attendance" },
      el("h2", { text: "Attendance" }),
      el("div", { class: "attendance" },
        el("div", {}, el("h3", { text: "Present (" + present.length + ")" }), el("ul", { class: "plain" }, present.map(person))),
        absent.length ? el("div", {}, el("h3", { text: "Absent (" + absent.length + ")" }), el("ul", { class: "plain" }, absent.map(person))) : null));
  }

  function renderSpeakers(m) {
    const counts = new Map();
    for (const u of m.utterances) counts.set(u.speaker, (counts.get(u.speaker) || 0) + 1);
    const rows = [...counts.entries()].map(([name, n]) => el("li", { class: "speaker-row" + (isUnnamed(name) ? " unnamed" : "") },
      el("span", { class: "speaker-name", text: name }),
      isUnnamed(name) ? el("span", { class: "tag tag-check", text: "not identified" }) : null,
      el("span", { class: "muted", text: n + (n === 1 ? " turn" : " turns") }),
      el("button", { type: "button", class: "button button-small", "data-rename": name, onclick: () => openRename(name), text: "Rename" })));
    const renames = state.review.renames.map(([from, to], index) => el("li", {},
      "“" + from + "” → “" + to + "” ",
      el("button", { type: "button", class: "button button-small", onclick: () => undoRename(index), text: "Undo" })));
    return el("section", { class: "block", id: "speakers" },
      el("h2", { text: "Speakers" }),
      el("p", { class: "hint", text: "Rename a speaker to correct the name everywhere it appears." }),
      el("ul", { class: "plain speakers" }, rows),
      renames.length ? el("div", {}, el("h3", { text: "Renamed" }), el("ul", { class: "plain" }, renames)) : null);
  }

  function renderTopics(m) {
    const topics = m.segments.map((s) => el("li", { class: "topic" },
      el("div", { class: "topic-head" },
        el("button", { type: "button", class: "link time", onclick: () => jumpTo(s.first_utterance, s.start), text: clock(s.start) + "–" + clock(s.end) }),
        el("h3", { text: s.title || "Part " + (s.index + 1) })),
      s.points.length ? el("ul", { class: "points" }, s.points.map((p) => el("li", {},
        el("button", { type: "button", class: "link time", onclick: () => jumpTo(p.utterance, p.start), text: clock(p.start) }),
        " ", p.text))) : null));
    return el("section", { class: "block", id: "topics" },
      el("h2", { text: "Topics" }), el("ol", { class: "plain topics" }, topics));
  }

  function renderSection(kind) {
    const items = state.minutes[kind.key];
    return el("section", { class: "block", id: "section-" + kind.key },
      el("h2", { text: kind.label + " (" + items.length + ")" }),
      items.length ? el("div", { class: "items" }, items.map((item) => renderItem(kind, item)))
        : el("p", { class: "muted", text: "None in the draft. Select words in the transcript to add one." }));
  }

  function fieldLine(kind, item) {
    const parts = [];
    const put = (label, value, cls) => parts.push(el("span", { class: "field" + (cls ? " " + cls : "") },
      el("span", { class: "field-label", text: label + " " }), el("span", { class: "field-value", "data-field": label.toLowerCase(), text: value })));
    if (kind.key === "actions") {
      put("Owner", item.owner || "—", isUnnamed(item.owner) || !item.owner ? "check" : "");
      put("Due", item.due || (item.due_text ? "“" + item.due_text + "” (not resolved)" : "—"));
      put("Status", item.status);
    } else if (kind.key === "decisions") {
      put("By", item.by || "—", isUnnamed(item.by) ? "check" : "");
    } else if (kind.key === "motions") {
      const v = item.vote;
      const count = (n) => (n === null || n === undefined ? "?" : String(n));
      put("Mover", item.mover || "—", isUnnamed(item.mover) || !item.mover ? "check" : "");
      put("Seconder", item.seconder || "none heard", isUnnamed(item.seconder) ? "check" : "");
      put("Vote", count(v.for) + "–" + count(v.against) + "–" + count(v.abstain) + " (for–against–abstain)", [v.for, v.against, v.abstain].includes(null) ? "check" : "");
      put("Outcome", item.outcome);
    } else {
      put("Asked by", item.asked_by || "—", isUnnamed(item.asked_by) ? "check" : "");
      put("Answered", item.answered ? "yes" : "no");
    }
    return parts;
  }

  function renderItem(kind, item) {
    const checks = checksFor(kind, item);
    const st = item.review_state;
    const card = el("article", {
      class: "item state-" + st + (checks.length ? " needs-check" : ""),
      id: "item-" + item.id, "data-id": item.id, tabindex: "0",
      "aria-label": kind.one + " " + item.id,
    });
    const text = kind.key === "actions" ? item.task : item.text;
    const stateTag = { accepted: el("span", { class: "tag tag-accepted", text: "Accepted" }),
      rejected: el("span", { class: "tag tag-rejected", text: "Rejected: left out of the minutes" }) }[st] || null;
    add(card,
      el("div", { class: "item-head" },
        el("span", { class: "item-id", text: item.id }),
        el("button", { type: "button", class: "link time", title: "Show in the transcript", onclick: (e) => { e.stopPropagation(); select(item.id, true); }, text: clock(item.time) }),
        kind.key === "motions" && item.amends ? el("span", { class: "muted", text: "amends " + item.amends }) : null,
        item.source === "clerk" ? el("span", { class: "tag", text: "added by you" }) : null,
        item.edited && item.edited.length ? el("span", { class: "tag tag-edited", text: "Edited" }) : null,
        checks.length ? el("span", { class: "tag tag-check", text: "Check" }) : null,
        stateTag),
      el("p", { class: "item-text", text: text }),
      el("div", { class: "fields" }, fieldLine(kind, item)),
      checks.length ? el("ul", { class: "checks" }, checks.map((c) => el("li", { text: c }))) : null,
      el("div", { class: "item-actions" },
        st === "accepted" ? el("button", { type: "button", class: "button", "data-action": "undo", onclick: () => setState(item.id, "pending"), text: "Undo accept" })
          : el("button", { type: "button", class: "button button-accept", "data-action": "accept", onclick: () => setState(item.id, "accepted"), disabled: st === "rejected" }, "Accept"),
        st === "rejected" ? el("button", { type: "button", class: "button", "data-action": "restore", onclick: () => setState(item.id, "pending"), text: "Put back" })
          : el("button", { type: "button", class: "button button-reject", "data-action": "reject", onclick: () => setState(item.id, "rejected"), text: "Reject" }),
        el("button", { type: "button", class: "button", "data-action": "edit", "aria-expanded": openForms.has(item.id) ? "true" : "false", onclick: () => toggleForm(item.id), text: openForms.has(item.id) ? "Close editor" : "Edit" })));
    if (openForms.has(item.id)) card.append(renderForm(kind, item));
    card.addEventListener("click", (e) => {
      if (e.target.closest("button, input, select, textarea, label, form")) return;
      select(item.id, true);
    });
    card.addEventListener("keydown", (e) => {
      if (e.key === "Enter" && e.target === card) select(item.id, true);
    });
    return card;
  }

  // ------------------------------------------------------------------ editing

  function input(label, field, value, type, extra) {
    const id = "f-" + field + "-" + Math.random().toString(36).slice(2, 8);
    let control;
    if (type === "textarea") {
      control = el("textarea", { id, rows: "3", maxlength: "2000", "data-field": field });
      control.value = value || "";
    } else if (type === "select") {
      control = el("select", { id, "data-field": field }, extra.map((o) => el("option", { value: o, text: o.replace("_", " ") })));
      control.value = value;
    } else {
      control = el("input", Object.assign({ id, type, "data-field": field, autocomplete: "off" }, extra || {}));
      control.value = value === null || value === undefined ? "" : String(value);
    }
    return el("div", { class: "form-row" }, el("label", { for: id, text: label }), control);
  }

  function renderForm(kind, item) {
    const rows = [];
    const name = { list: "people", maxlength: "200" };
    if (kind.key === "actions") {
      rows.push(input("Action", "task", item.task, "textarea"),
        input("Owner", "owner", item.owner, "text", name),
        input("Due date", "due", item.due, "date"),
        input("Status", "status", item.status, "select", STATUSES));
    } else if (kind.key === "decisions") {
      rows.push(input("Decision", "text", item.text, "textarea"), input("Decided by", "by", item.by, "text", name));
    } else if (kind.key === "motions") {
      const v = item.vote;
      const count = { min: "0", max: "100000", step: "1", inputmode: "numeric", placeholder: "not heard" };
      rows.push(input("Motion", "text", item.text, "textarea"),
        input("Mover", "mover", item.mover, "text", name),
        input("Seconder", "seconder", item.seconder, "text", Object.assign({ placeholder: "none heard" }, name)),
        el("div", { class: "form-row counts" },
          input("For", "for", v.for, "number", count), input("Against", "against", v.against, "number", count),
          input("Abstain", "abstain", v.abstain, "number", count)),
        input("How the vote was taken", "method", v.method || "none", "select", METHODS),
        input("Outcome", "outcome", item.outcome, "select", OUTCOMES));
      const original = findOriginalFlags(item);
      if (original.length) {
        rows.push(el("fieldset", { class: "flags" }, el("legend", { text: "Notes for the clerk (untick when settled)" }),
          original.map((flag) => {
            const id = "flag-" + Math.random().toString(36).slice(2, 8);
            const box = el("input", { type: "checkbox", id, "data-flag": flag });
            box.checked = (item.flags || []).includes(flag);
            return el("div", { class: "flag-row" }, box, el("label", { for: id, text: flag }));
          })));
      }
    } else {
      const box = el("input", { type: "checkbox", id: "answered-" + item.id, "data-field": "answered" });
      box.checked = !!item.answered;
      rows.push(input("Question", "text", item.text, "textarea"), input("Asked by", "asked_by", item.asked_by, "text", name),
        el("div", { class: "form-row form-check" }, box, el("label", { for: "answered-" + item.id, text: "Answered in the meeting" })));
    }
    const form = el("form", { class: "item-form", "data-for": item.id, novalidate: true },
      rows, el("p", { class: "hint", text: "Each change is saved when you leave the field." }),
      el("p", { class: "field-error", hidden: true }),
      el("div", { class: "form-buttons" }, el("button", { type: "button", class: "button button-primary", onclick: () => toggleForm(item.id), text: "Done" })));
    form.addEventListener("submit", (e) => e.preventDefault());
    form.addEventListener("change", (e) => saveField(kind, item.id, form, e.target));
    return form;
  }

  function findOriginalFlags(item) {
    // The flags the draft raised stay listed (ticked or not) so a settled one can be restored.
    return item.draft_flags || item.flags || [];
  }

  async function saveField(kind, id, form, target) {
    let fields = {};
    if (target.dataset.flag !== undefined) {
      fields.flags = [...form.querySelectorAll("input[data-flag]")].filter((b) => b.checked).map((b) => b.dataset.flag);
    } else {
      const field = target.dataset.field;
      if (!field) return;
      let value = target.type === "checkbox" ? target.checked : target.value;
      if (target.type === "number") {
        if (value === "") value = null;
        else if (!/^\d+$/.test(value)) { showFieldError(form, "Counts are whole numbers (leave empty if not heard)."); return; }
        else value = Number(value);
      }
      if (field === "due" && value === "") value = null;
      fields[field] = value;
    }
    showFieldError(form, "");
    const result = await send({ op: "set", id, fields });
    if (!result) { showFieldError(form, $("save-status").textContent); return; }
    refreshCard(id);
  }

  function showFieldError(form, text) {
    const node = form.querySelector(".field-error");
    node.textContent = text;
    node.hidden = !text;
  }

  function refreshCard(id) {
    // Redraw the card's summary but keep its open form (and the focus inside it) as it is.
    const [kind, item] = findItem(id);
    const old = $("item-" + id);
    if (!kind || !old) { renderMinutes(); return; }
    const form = old.querySelector(".item-form");
    const fresh = renderItem(kind, item);
    const freshForm = fresh.querySelector(".item-form");
    if (form && freshForm) freshForm.replaceWith(form);
    old.replaceWith(fresh);
    if (selected === id) markSelected(id, false);
    renderProgress();
  }

  async function setState(id, value) {
    if (await send({ op: "state", id, state: value })) refreshCard(id);
  }

  function toggleForm(id) {
    if (openForms.has(id)) openForms.delete(id); else openForms.add(id);
    const [kind, item] = findItem(id);
    const old = $("item-" + id);
    if (!kind || !old) return;
    const fresh = renderItem(kind, item);
    old.replaceWith(fresh);
    if (selected === id) markSelected(id, false);
    const first = fresh.querySelector(".item-form textarea, .item-form input");
    if (first) first.focus();
    else fresh.querySelector("[data-action=edit]").focus();
  }

  function renderProgress() {
    const items = allItems().map(([, item]) => item);
    const done = items.filter((i) => i.review_state !== "pending").length;
    const flagged = allItems().filter(([k, i]) => i.review_state === "pending" && checksFor(k, i).length).length;
    $("progress").textContent = done + " of " + items.length + " items checked" + (flagged ? " · " + flagged + " marked “Check” still open" : "");
    const badge = $("doc-status");
    badge.textContent = state.minutes.draft ? "DRAFT" : "Approved";
  }

  function renderPeopleList() {
    const names = new Set();
    for (const u of state.minutes.utterances) names.add(u.speaker);
    for (const a of state.minutes.attendees) names.add(a.name);
    $("people").replaceChildren(...[...names].filter((n) => !isUnnamed(n)).sort().map((n) => el("option", { value: n })));
  }

  // ------------------------------------------------------------------ notes for the clerk

  function renderNotes(m) {
    const notes = m.notes || [];
    if (!notes.length) return el("section", { class: "block", id: "notes" });
    const states = m.note_states || {};
    return el("section", { class: "block", id: "notes" },
      el("h2", { text: "Notes for the clerk (" + notes.length + ")" }),
      el("p", { class: "hint", text: "Dismiss a note once you have dealt with it; dismissed notes are left out of the minutes." }),
      el("ul", { class: "plain notes" }, notes.map((note, n) => {
        const id = "N" + (n + 1);
        const dismissed = states[id] === "rejected";
        return el("li", { class: "note" + (dismissed ? " dismissed" : ""), id: "note-" + id },
          el("span", { text: note }), " ",
          el("button", { type: "button", class: "button button-small", onclick: async () => { if (await send({ op: "state", id, state: dismissed ? "pending" : "rejected" })) renderMinutes(); }, text: dismissed ? "Keep" : "Dismiss" }));
      })));
  }

  // ------------------------------------------------------------------ transcript and evidence

  function renderTranscript() {
    const list = $("transcript");
    const keep = $("transcript-pane").scrollTop;
    list.replaceChildren(...state.minutes.utterances.map((u) => el("li", {
      class: "utt" + (isUnnamed(u.speaker) ? " unnamed" : ""), id: "u-" + u.index, "data-index": String(u.index),
    },
      el("div", { class: "utt-head" },
        el("button", { type: "button", class: "link time", tabindex: "-1", onclick: () => play(u.start), text: clock(u.start) }),
        el("span", { class: "speaker", text: u.speaker }),
        isUnnamed(u.speaker) ? el("span", { class: "tag tag-check", text: "not identified" }) : null),
      el("p", { class: "utt-text", text: u.text }))));
    $("transcript-pane").scrollTop = keep;
  }

  function clearHighlight() {
    for (const node of document.querySelectorAll(".utt.evidence")) {
      node.classList.remove("evidence");
      const p = node.querySelector(".utt-text");
      p.textContent = state.minutes.utterances[Number(node.dataset.index)].text;
    }
    for (const node of document.querySelectorAll(".item.selected")) node.classList.remove("selected");
  }

  function highlightQuote(p, text, quote) {
    const at = quote ? text.indexOf(quote) : -1;
    if (at < 0) return;
    p.replaceChildren(document.createTextNode(text.slice(0, at)), el("mark", { text: quote }),
      document.createTextNode(text.slice(at + quote.length)));
  }

  function markSelected(id, scroll) {
    const [, item] = findItem(id);
    clearHighlight();
    if (!item) return null;
    const card = $("item-" + id);
    if (card) card.classList.add("selected");
    let first = null;
    for (const ev of item.evidence || []) {
      const node = $("u-" + ev.utterance);
      if (!node) continue;
      node.classList.add("evidence");
      highlightQuote(node.querySelector(".utt-text"), state.minutes.utterances[ev.utterance].text, ev.quote);
      if (!first || ev.start < first.start) first = { node, start: ev.start };
    }
    if (scroll && first) first.node.scrollIntoView({ block: "center", behavior: "instant" });
    return first;
  }

  function select(id, scroll) {
    selected = id;
    const first = markSelected(id, scroll);
    if (first) play(first.start);
  }

  function jumpTo(index, start) {
    const node = $("u-" + index);
    if (node) {
      node.scrollIntoView({ block: "start", behavior: "instant" });
      node.classList.add("flash");
      setTimeout(() => node.classList.remove("flash"), 1200);
    }
    play(start);
  }

  function play(seconds) {
    const audio = document.querySelector("#player audio");
    if (!audio) return;
    audio.currentTime = Math.max(0, Number(seconds) || 0);
    const started = audio.play();
    if (started && started.catch) started.catch(() => {});
  }

  // ------------------------------------------------------------------ adding from a selection

  function offsetIn(p, node, offset) {
    const range = document.createRange();
    range.selectNodeContents(p);
    range.setEnd(node, offset);
    return range.toString().length;
  }

  function spansOfSelection() {
    const sel = window.getSelection();
    if (!sel || sel.isCollapsed || sel.rangeCount === 0) return null;
    const range = sel.getRangeAt(0);
    const list = $("transcript");
    if (!list.contains(range.commonAncestorContainer) && range.commonAncestorContainer !== list) return null;
    const spans = [];
    for (const li of list.children) {
      if (!range.intersectsNode(li)) continue;
      const p = li.querySelector(".utt-text");
      const length = p.textContent.length;
      const follows = (a, b) => !!(a.compareDocumentPosition(b) & Node.DOCUMENT_POSITION_FOLLOWING);
      let from, to;
      if (p.contains(range.startContainer)) from = offsetIn(p, range.startContainer, range.startOffset);
      else from = follows(range.startContainer, p) ? 0 : length; // began before this text, or after it
      if (p.contains(range.endContainer)) to = offsetIn(p, range.endContainer, range.endOffset);
      else to = follows(p, range.endContainer) ? length : 0; // ends after this text, or before it
      if (to > from && p.textContent.slice(from, to).trim()) spans.push({ utterance: Number(li.dataset.index), from, to });
    }
    return spans.length ? spans.slice(0, 50) : null;
  }

  function onSelectionChange() {
    pendingSpans = spansOfSelection();
    $("selection-bar").hidden = !pendingSpans;
    $("selection-hint").hidden = !!pendingSpans;
  }

  async function addFromSelection(kindName) {
    if (!pendingSpans) return;
    const spans = pendingSpans;
    const before = new Set(allItems().map(([, i]) => i.id));
    const result = await send({ op: "add", kind: kindName, span: spans });
    if (!result) return;
    window.getSelection().removeAllRanges();
    onSelectionChange();
    const fresh = allItems().map(([, i]) => i.id).find((id) => !before.has(id));
    if (fresh) openForms.add(fresh);
    renderMinutes();
    if (fresh) {
      const card = $("item-" + fresh);
      card.scrollIntoView({ block: "center", behavior: "instant" });
      select(fresh, false);
      const first = card.querySelector(".item-form textarea");
      if (first) first.focus();
    }
  }

  // ------------------------------------------------------------------ renaming

  let renaming = null;

  function openRename(name) {
    renaming = name;
    $("rename-old").textContent = name;
    $("rename-new").value = isUnnamed(name) ? "" : name;
    $("rename-error").hidden = true;
    $("rename-dialog").showModal();
    $("rename-new").focus();
  }

  async function doRename(e) {
    e.preventDefault();
    const to = $("rename-new").value.trim();
    if (!to) return;
    const result = await send({ op: "rename", from: renaming, to });
    if (!result) {
      $("rename-error").textContent = $("save-status").textContent;
      $("rename-error").hidden = false;
      return;
    }
    $("rename-dialog").close();
    renderAll();
  }

  async function undoRename(index) {
    if (await send({ op: "unrename", index })) renderAll();
  }

  // ------------------------------------------------------------------ export

  async function exportAs(format) {
    await queue; // every edit made so far is in the export
    const approved = $("approved-on").value;
    const query = new URLSearchParams({ format });
    if (approved) query.set("approved_on", approved);
    let response;
    try {
      response = await fetch("/api/export?" + query.toString());
    } catch (err) {
      setSaveStatus("Export failed: the review server cannot be reached (" + err.message + ")", "error");
      return;
    }
    if (!response.ok) {
      const payload = await response.json().catch(() => ({}));
      setSaveStatus("Export failed: " + (payload.error || response.statusText), "error");
      return;
    }
    const disposition = response.headers.get("Content-Disposition") || "";
    const match = /filename="([^"]+)"/.exec(disposition);
    const url = URL.createObjectURL(await response.blob());
    const link = el("a", { href: url, download: match ? match[1] : "minutes." + format });
    document.body.append(link);
    link.click();
    link.remove();
    setTimeout(() => URL.revokeObjectURL(url), 60000);
    setSaveStatus("Exported " + (match ? match[1] : format) + (approved ? " (approved " + approved + ")" : " (still a DRAFT)"), "ok");
  }

  // ------------------------------------------------------------------ start

  function renderAll() {
    renderTranscript();
    renderMinutes();
  }

  function setUpPlayer() {
    if (!state.session.recording) return;
    const player = $("player");
    player.append(el("audio", { controls: true, preload: "metadata", src: "/recording", "aria-label": "Recording: " + state.session.recording_name }));
    player.hidden = false;
  }

  async function start() {
    try {
      await load();
    } catch (err) {
      const banner = $("load-error");
      banner.textContent = "The draft could not be loaded: " + err.message + ". Is `minutes review` still running?";
      banner.hidden = false;
      return;
    }
    setUpPlayer();
    renderAll();
    setSaveStatus(state.review.updated ? "Review restored from " + state.session.review_file : "Edits are saved to " + state.session.review_file, "");
    document.addEventListener("selectionchange", onSelectionChange);
    for (const button of document.querySelectorAll("#selection-bar button")) {
      button.addEventListener("mousedown", (e) => e.preventDefault()); // keep the selection
      button.addEventListener("click", () => addFromSelection(button.dataset.kind));
    }
    for (const button of document.querySelectorAll("#export-form button")) {
      button.addEventListener("click", () => exportAs(button.dataset.format));
    }
    $("rename-form").addEventListener("submit", doRename);
    $("rename-cancel").addEventListener("click", () => $("rename-dialog").close());
    window.addEventListener("beforeunload", (e) => { if (saving > 0) e.preventDefault(); });
    document.body.dataset.ready = "true";
  }

  document.addEventListener("DOMContentLoaded", start);
})();
