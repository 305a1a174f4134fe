// The review queue (analyzer/review/review_pages.cpp): filters hide rows,
// j/k move, Enter opens, u opens the first undecided clip. The rows and the
// decisions come from the server with the page; nothing is fetched here.
(function () {
  'use strict';
  var rows = Array.prototype.slice.call(document.querySelectorAll('#rows .row'));
  var ids = ['verdict', 'metric', 'model', 'prompt', 'decided'];
  var current = -1;
  function value(id) { return document.getElementById('f-' + id).value; }
  function visible() { return rows.filter(function (r) { return !r.hidden; }); }
  function apply() {
    var v = value('verdict'), m = value('metric'), mo = value('model'), p = value('prompt'), d = value('decided');
    rows.forEach(function (r) {
      var ok = (!v || r.dataset.verdict === v) &&
        (!m || r.dataset.metrics.split(' ').indexOf(m) >= 0) &&
        (!mo || r.dataset.model === mo) && (!p || r.dataset.prompt === p) &&
        (!d || (d === 'yes') === (r.dataset.decision !== ''));
      r.hidden = !ok;
    });
    var shown = visible();
    document.getElementById('shown').textContent = String(shown.length);
    document.getElementById('left').textContent =
      String(rows.filter(function (r) { return r.dataset.decision === ''; }).length);
    move(0, true);
  }
  function move(step, reset) {
    var shown = visible();
    rows.forEach(function (r) { r.classList.remove('current'); });
    if (!shown.length) { current = -1; return; }
    var at = reset ? 0 : Math.max(0, Math.min(shown.length - 1, shown.indexOf(rows[current]) + step));
    current = rows.indexOf(shown[at]);
    shown[at].classList.add('current');
    var link = shown[at].querySelector('a.clip-id');
    if (link && !reset) link.focus();
  }
  ids.forEach(function (id) { document.getElementById('f-' + id).addEventListener('change', apply); });
  document.addEventListener('keydown', function (e) {
    if (e.target.tagName === 'SELECT' || e.target.tagName === 'INPUT' || e.ctrlKey || e.metaKey || e.altKey) return;
    if (e.key === 'j') { move(1); e.preventDefault(); }
    else if (e.key === 'k') { move(-1); e.preventDefault(); }
    else if (e.key === 'Enter' && current >= 0 && e.target.tagName !== 'A') {
      rows[current].querySelector('a.clip-id').click();
    } else if (e.key === 'u') {
      var next = rows.filter(function (r) { return r.dataset.decision === ''; })[0];
      if (next) next.querySelector('a.clip-id').click();
    }
  });
  apply();
}());
