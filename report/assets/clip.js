// clipwarden per-clip page: the timeline's readout and keyboard navigation.
// Reads the data block #fl-data; writes only text nodes (never HTML).
(function () {
  'use strict';
  var dataNode = document.getElementById('fl-data');
  var readout = document.getElementById('readout');
  var cursor = document.getElementById('tl-cursor');
  if (!dataNode || !readout || !cursor) return;
  var data = JSON.parse(dataNode.textContent);
  var times = data.times;
  if (!times.length) return;
  var markers = Array.prototype.slice.call(document.querySelectorAll('.seg-marker'));
  markers.sort(function (a, b) {
    var sa = data.segments[a.dataset.seg], sb = data.segments[b.dataset.seg];
    return sa.start_frame - sb.start_frame || sa.end_frame - sb.end_frame;
  });
  var pinned = false;
  var shown = -1;

  function fmt(v) {
    if (v === null || v === undefined) return '\u2014';
    var a = Math.abs(v);
    if (a !== 0 && (a < 0.001 || a >= 1e5)) return v.toExponential(2);
    return String(Number(v.toPrecision(4)));
  }
  function frameAt(t) {
    var lo = 0, hi = times.length - 1;
    while (lo < hi) {
      var mid = (lo + hi + 1) >> 1;
      if (times[mid] <= t) lo = mid; else hi = mid - 1;
    }
    return lo;
  }
  function el(tag, cls, text) {
    var e = document.createElement(tag);
    if (cls) e.className = cls;
    if (text !== undefined) e.textContent = text;
    return e;
  }
  function show(i) {
    i = Math.max(0, Math.min(times.length - 1, i));
    shown = i;
    var x = (times[i] + data.dt / 2 - data.t0) / data.span;
    cursor.hidden = false;
    cursor.style.left = (100 * Math.max(0, Math.min(1, x))) + '%';
    readout.textContent = '';
    var head = el('span', 'rv');
    head.appendChild(el('strong', '', 'Frame ' + i));
    head.appendChild(document.createTextNode(' at ' + times[i].toFixed(3) + ' s'));
    readout.appendChild(head);
    data.series.forEach(function (s) {
      var item = el('span', 'rv');
      item.appendChild(el('b', '', s.metric));
      item.appendChild(document.createTextNode(fmt(s.values[i])));
      readout.appendChild(item);
    });
    data.segments.forEach(function (s) {
      if (i < s.start_frame || i > s.end_frame) return;
      readout.appendChild(el('span', 'rv', 'in ' + s.severity + ' ' + s.metric + ' segment ' +
                                           s.start_frame + '\u2013' + s.end_frame));
    });
  }
  function fromPointer(ev, track) {
    var r = track.getBoundingClientRect();
    var f = (ev.clientX - r.left) / r.width;
    show(frameAt(data.t0 + f * data.span));
  }

  Array.prototype.forEach.call(document.querySelectorAll('.tl-track, .tl-thumbs'), function (track) {
    track.addEventListener('pointermove', function (ev) { if (!pinned) fromPointer(ev, track); });
    track.addEventListener('click', function (ev) {
      if (ev.target.classList.contains('seg-marker')) return;  // the link handles it
      pinned = true;
      fromPointer(ev, track);
    });
  });

  function markCurrent(m) {
    markers.forEach(function (x) { x.classList.toggle('current', x === m); });
  }
  markers.forEach(function (m) {
    m.addEventListener('focus', function () {
      pinned = true;
      markCurrent(m);
      show(data.segments[m.dataset.seg].peak_frame);
    });
  });
  function stepMarker(dir) {
    if (!markers.length) return;
    var at = markers.indexOf(document.activeElement);
    var next;
    if (at >= 0) {
      next = (at + dir + markers.length) % markers.length;
    } else {
      // From the cursor (or the clip's start): the nearest segment that way.
      var ref = shown < 0 ? (dir > 0 ? -1 : times.length) : shown;
      next = dir > 0 ? 0 : markers.length - 1;
      for (var k = 0; k < markers.length; k++) {
        var start = data.segments[markers[k].dataset.seg].start_frame;
        if (dir > 0 && start > ref) { next = k; break; }
        if (dir < 0 && start < ref) next = k;
      }
    }
    markers[next].focus();
  }
  document.addEventListener('keydown', function (ev) {
    if (ev.altKey || ev.ctrlKey || ev.metaKey) return;
    var onMarker = markers.indexOf(document.activeElement) >= 0;
    if (ev.key === 'n' || ev.key === 'p') {
      stepMarker(ev.key === 'n' ? 1 : -1);
      ev.preventDefault();
    } else if ((ev.key === 'ArrowRight' || ev.key === 'ArrowLeft') && (pinned || onMarker)) {
      if (onMarker) document.activeElement.blur();
      markCurrent(null);
      pinned = true;
      show((shown < 0 ? 0 : shown) + (ev.key === 'ArrowRight' ? 1 : -1));
      ev.preventDefault();
    } else if (ev.key === 'Escape') {
      pinned = false;
      markCurrent(null);
      cursor.hidden = true;
    }
  });
})();
