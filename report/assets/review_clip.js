// One clip under review (analyzer/review/review_pages.cpp): the video and
// the timeline move together (playing moves the cursor; clicking or
// dragging the timeline seeks), flagged segments are marks that jump the
// video there, and one key decides: the decision is POSTed with the access
// token in a header and a request id made here, so a retry is stored once.
(function () {
  'use strict';
  var data = JSON.parse(document.getElementById('clip-data').textContent);
  var token = document.querySelector('meta[name="clipwarden-token"]').content;
  var video = document.getElementById('video');
  var box = document.getElementById('timeline');
  var readout = document.getElementById('readout');
  var statusLine = document.getElementById('status');
  var svgNs = 'http://www.w3.org/2000/svg';
  var t = data.t, series = data.series, segments = data.segments;
  var duration = t.length ? t[t.length - 1] + (t.length > 1 ? t[1] - t[0] : 0) : 0;
  var W = 960, rowH = 34, top = 4;
  var H = top + Math.max(1, series.length) * rowH;
  var svg = document.createElementNS(svgNs, 'svg');
  svg.setAttribute('viewBox', '0 0 ' + W + ' ' + H);
  svg.setAttribute('role', 'img');
  box.appendChild(svg);

  function el(name, attrs, parent) {
    var e = document.createElementNS(svgNs, name);
    Object.keys(attrs).forEach(function (k) { e.setAttribute(k, attrs[k]); });
    (parent || svg).appendChild(e);
    return e;
  }
  function x(sec) { return duration > 0 ? sec / duration * W : 0; }
  function frameAt(sec) {
    var lo = 0, hi = t.length - 1;
    if (hi < 0) return -1;
    while (lo < hi) { var mid = (lo + hi + 1) >> 1; if (t[mid] <= sec + 1e-6) lo = mid; else hi = mid - 1; }
    return lo;
  }
  segments.forEach(function (s, i) {
    var row = series.findIndex(function (se) { return se.metric === s.metric; });
    var y = row < 0 ? top : top + row * rowH;
    var r = el('rect', { x: x(s.start_s), y: y, width: Math.max(2, x(s.end_s) - x(s.start_s)),
                         height: row < 0 ? H - top : rowH - 4, 'class': 'seg ' + s.severity });
    r.dataset.seg = String(i);
  });
  series.forEach(function (se, row) {
    var vals = se.values.filter(function (v) { return v !== null; });
    var max = vals.length ? Math.max.apply(null, vals) : 0, min = vals.length ? Math.min(0, Math.min.apply(null, vals)) : 0;
    var span = max - min || 1, y0 = top + row * rowH, h = rowH - 8, d = '';
    se.values.forEach(function (v, i) {
      if (v === null) return;
      d += (d ? 'L' : 'M') + x(t[i]).toFixed(1) + ' ' + (y0 + h - (v - min) / span * h).toFixed(1);
    });
    el('path', { d: d || 'M0 0', 'class': 'line' });
    var label = el('text', { x: 4, y: y0 + 11, 'class': 'label' });
    label.textContent = se.metric + ' (max ' + (vals.length ? max.toPrecision(3) : '-') + ')';
  });
  var cursor = el('line', { x1: 0, x2: 0, y1: 0, y2: H, 'class': 'cursor' });

  function show(sec) {
    cursor.setAttribute('x1', x(sec)); cursor.setAttribute('x2', x(sec));
    var f = frameAt(sec);
    if (f < 0) return;
    var parts = ['frame ' + f, sec.toFixed(2) + ' s'];
    series.forEach(function (se) {
      var v = se.values[f];
      parts.push(se.metric + ' ' + (v === null ? '-' : Number(v).toPrecision(3)));
    });
    readout.textContent = parts.join('  ');
  }
  function seek(sec) {
    sec = Math.max(0, Math.min(duration, sec));
    if (video) video.currentTime = sec;
    show(sec);
  }
  function secFromEvent(e) {
    var r = svg.getBoundingClientRect();
    return (e.clientX - r.left) / r.width * duration;
  }
  var dragging = false;
  box.addEventListener('pointerdown', function (e) { dragging = true; seek(secFromEvent(e)); });
  box.addEventListener('pointermove', function (e) { if (dragging) seek(secFromEvent(e)); });
  window.addEventListener('pointerup', function () { dragging = false; });
  if (video) {
    video.addEventListener('timeupdate', function () { show(video.currentTime); });
    video.addEventListener('seeked', function () { show(video.currentTime); });
  }

  var marks = document.getElementById('marks');
  var flagged = segments.map(function (s, i) { return i; }).filter(function (i) { return segments[i].severity !== 'info'; });
  if (!flagged.length) flagged = segments.map(function (s, i) { return i; });
  var markAt = -1;
  flagged.forEach(function (i) {
    var s = segments[i], b = document.createElement('button');
    b.type = 'button';
    b.className = 'mark ' + s.severity;
    b.dataset.seg = String(i);
    b.textContent = s.metric + ' ' + s.severity + ' ' + s.start_s.toFixed(2) + '-' + s.end_s.toFixed(2) + ' s';
    b.addEventListener('click', function () { jump(flagged.indexOf(i)); });
    marks.appendChild(b);
  });
  function jump(k) {
    if (!flagged.length) return;
    markAt = (k + flagged.length) % flagged.length;
    var s = segments[flagged[markAt]];
    if (video) video.pause();
    seek(s.start_s);
    marks.children[markAt].focus();
  }

  // The worst frames: the peak of each flagged segment, worst first.
  var peaks = flagged.map(function (i) { return segments[i]; }).sort(function (a, b) {
    var rank = { reject: 0, review: 1, info: 2 };
    return rank[a.severity] - rank[b.severity] || (b.end_s - b.start_s) - (a.end_s - a.start_s);
  }).map(function (s) { return s.peak_frame; }).filter(function (f, i, all) { return all.indexOf(f) === i; }).slice(0, 3);
  var panels = document.getElementById('panels');
  peaks.forEach(function (f) {
    var fig = document.createElement('figure');
    var img = document.createElement('img');
    img.loading = 'lazy';
    img.alt = 'pictures of frame ' + f;
    img.src = '/clip/' + data.key + '/panels/' + f + '.jpg?token=' + encodeURIComponent(token);
    var cap = document.createElement('figcaption');
    cap.className = 'quiet';
    cap.textContent = 'frame ' + f + (t[f] !== undefined ? ', ' + t[f].toFixed(2) + ' s' : '');
    fig.appendChild(img); fig.appendChild(cap); panels.appendChild(fig);
  });
  if (!peaks.length) panels.textContent = 'No flagged segment.';

  // Decisions.
  var tagBoxes = document.getElementById('tag-boxes');
  data.tag_choices.forEach(function (name) {
    var label = document.createElement('label'), box2 = document.createElement('input');
    box2.type = 'checkbox'; box2.value = name;
    box2.checked = data.suggested_tags.indexOf(name) >= 0 && !data.decision;
    label.appendChild(box2); label.appendChild(document.createTextNode(' ' + name));
    tagBoxes.appendChild(label);
  });
  var reviewer = document.getElementById('reviewer');
  try { reviewer.value = localStorage.getItem('clipwarden-reviewer') || ''; } catch (e) { /* storage off */ }
  reviewer.addEventListener('change', function () {
    try { localStorage.setItem('clipwarden-reviewer', reviewer.value); } catch (e) { /* storage off */ }
  });
  function describe(d) {
    return d ? 'Decided: ' + d.decision.replace('_', ' ') + ' by ' + d.reviewer + ' at ' + d.decided_at +
      (d.tags.length ? ' [' + d.tags.join(', ') + ']' : '') : 'Not decided yet.';
  }
  var current = document.getElementById('current-decision');
  current.textContent = describe(data.decision);
  if (data.decision) {
    document.getElementById('note').value = data.decision.note;
    Array.prototype.forEach.call(tagBoxes.querySelectorAll('input'), function (b) {
      b.checked = data.decision.tags.indexOf(b.value) >= 0;
    });
  }
  function requestId() {
    if (window.crypto && crypto.randomUUID) return crypto.randomUUID();
    var a = new Uint8Array(16); crypto.getRandomValues(a);
    return Array.prototype.map.call(a, function (b) { return (b + 256).toString(16).slice(1); }).join('');
  }
  var sending = false;
  function decide(decision) {
    if (sending) return;
    sending = true;
    var tags = Array.prototype.filter.call(tagBoxes.querySelectorAll('input'), function (b) { return b.checked; })
      .map(function (b) { return b.value; });
    document.getElementById('free-tags').value.split(',').forEach(function (s) {
      s = s.trim(); if (s && tags.indexOf(s) < 0) tags.push(s);
    });
    var body = JSON.stringify({ clip: data.key, decision: decision, tags: tags, request_id: requestId(),
      note: document.getElementById('note').value, reviewer: reviewer.value });
    statusLine.textContent = 'Saving...';
    var attempt = function (left) {
      return fetch('/api/decide', { method: 'POST', headers: { 'Content-Type': 'application/json',
        'X-Clipwarden-Token': token }, body: body }).then(function (res) {
        if (!res.ok) return res.text().then(function (text) { throw new Error(text.trim()); });
        return res.json();
      }).catch(function (err) {
        // The same request id again: the server stores it once however often it comes.
        if (left > 0 && !(err instanceof Error && /^refused|^decision|^no such/.test(err.message)))
          return new Promise(function (ok) { setTimeout(ok, 500); }).then(function () { return attempt(left - 1); });
        throw err;
      });
    };
    attempt(3).then(function (answer) {
      current.textContent = describe(answer.decision);
      statusLine.textContent = 'Saved.';
      document.body.dataset.saved = answer.decision.decision;
      location.href = answer.next ? '/clip/' + answer.next + '?token=' + encodeURIComponent(token)
                                  : '/?token=' + encodeURIComponent(token);
    }).catch(function (err) {
      statusLine.textContent = 'Not saved: ' + err.message;
      sending = false;
    });
  }
  Array.prototype.forEach.call(document.querySelectorAll('.buttons button'), function (b) {
    b.addEventListener('click', function () { decide(b.dataset.decision); });
  });
  document.addEventListener('keydown', function (e) {
    var tag = e.target.tagName;
    if (e.ctrlKey || e.metaKey || e.altKey) return;
    if (tag === 'INPUT' || tag === 'TEXTAREA' || tag === 'SELECT') {
      if (e.key === 'Escape') e.target.blur();
      return;
    }
    var keys = { k: 'keep', r: 'reject', s: 'second_look' };
    if (keys[e.key]) { decide(keys[e.key]); e.preventDefault(); }
    else if (e.key === 'n') { jump(markAt + 1); e.preventDefault(); }
    else if (e.key === 'p') { jump(markAt - 1); e.preventDefault(); }
    else if (e.key === 't') { var first = tagBoxes.querySelector('input'); if (first) first.focus(); e.preventDefault(); }
    else if (e.key === 'o') { document.getElementById('note').focus(); e.preventDefault(); }
    else if (e.key === 'q') { location.href = document.getElementById('to-queue').href; }
    else if (e.key === ' ' && video && e.target !== video) { if (video.paused) video.play(); else video.pause(); e.preventDefault(); }
  });
  show(0);
}());
