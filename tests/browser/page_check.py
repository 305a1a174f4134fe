#!/usr/bin/python3
"""Loads a clipwarden page in headless Chromium and reports what happened.

Usage: page_check.py CHROMIUM PAGE.html SCREENSHOT.png [LITERALS.json]

Drives Chromium over the DevTools protocol on a pipe (--remote-debugging-pipe:
JSON messages separated by NUL bytes on fds 3 and 4), so only the Python
standard library is needed. Prints one JSON object: console errors, uncaught
exceptions, CSP violations, every request that is not a data: URI or the page
itself, calls to alert(), and facts read from the DOM, including the effect
of pressing "n" (next flagged segment). With LITERALS.json (a JSON list of
strings), also whether each string is shown as text on the page (rendered
text or the title), and counts of what injected markup would leave: event
handler attributes, javascript: URLs, scripts that call alert. Exits 0 when the page was checked,
1 when the browser could not be driven (the message says why).
"""
import base64
import fcntl
import json
import os
import pathlib
import select
import shutil
import subprocess
import sys
import tempfile
import time

DEADLINE_S = 25

# Runs in the page before its own scripts (DevTools-injected, so the page's
# CSP does not apply to it): records CSP violations and alert() calls.
PRELUDE = """
window.__violations = [];
window.__alerts = [];
document.addEventListener('securitypolicyviolation', function (e) {
  window.__violations.push(e.violatedDirective + ' blocked ' + (e.blockedURI || 'inline'));
});
window.alert = function (m) { window.__alerts.push(String(m)); };
window.confirm = function (m) { window.__alerts.push('confirm ' + String(m)); return false; };
window.prompt = function (m) { window.__alerts.push('prompt ' + String(m)); return null; };
"""

# Read after load when literals are given: what hostile input would leave.
HOSTILE_FACTS = """
(function (literals) {
  var all = Array.prototype.slice.call(document.querySelectorAll('*'));
  var handlers = [], jsUrls = [];
  all.forEach(function (e) {
    Array.prototype.forEach.call(e.attributes, function (a) {
      var name = a.name.toLowerCase(), value = a.value.replace(/[\\s\\u0000-\\u001f]/g, '').toLowerCase();
      if (name.indexOf('on') === 0) handlers.push(e.tagName + ' ' + a.name);
      if ((name === 'href' || name === 'src' || name === 'action' || name === 'formaction') &&
          value.indexOf('javascript:') === 0) jsUrls.push(e.tagName + ' ' + a.value);
    });
  });
  var text = document.body ? document.body.innerText : '';
  var missing = literals.filter(function (l) {
    return text.indexOf(l) < 0 && document.title.indexOf(l) < 0;
  });
  var alerting = Array.prototype.filter.call(document.scripts, function (s) {
    return s.textContent.indexOf('alert(') >= 0;
  }).length;
  return JSON.stringify({handlers: handlers, javascript_urls: jsUrls, missing_literals: missing,
                         scripts_calling_alert: alerting, iframes: document.querySelectorAll('iframe, object, embed').length});
})(%s)
"""

# Read after load; returns facts about the DOM.
DOM_FACTS = """
(function () {
  function text(sel) { var e = document.querySelector(sel); return e ? e.textContent : null; }
  var imgs = Array.prototype.slice.call(document.images);
  return JSON.stringify({
    markers: document.querySelectorAll('.seg-marker').length,
    segment_rows: document.querySelectorAll('tr[id^="seg-"]').length,
    panel_sets: document.querySelectorAll('.panel-set').length,
    title: document.title,
    h1: text('h1'),
    facts: text('.facts'),
    notes: document.getElementById('h-notes') ? document.getElementById('h-notes').parentNode.textContent : '',
    caution: text('.caution'),
    non_data_images: imgs.filter(function (i) { return i.src.indexOf('data:') !== 0; }).length,
    broken_images: imgs.filter(function (i) { return !(i.complete && i.naturalWidth > 0); }).length,
    images: imgs.length,
    elements_with_onerror: document.querySelectorAll('[onerror]').length,
    injected_bold: document.querySelectorAll('.facts b, h1 img, .facts img, .facts script').length,
    scripts: document.scripts.length,
    violations: window.__violations,
    alerts: window.__alerts,
    page_height: document.documentElement.scrollHeight
  });
})()
"""

AFTER_KEY = """
JSON.stringify({
  focused_marker: document.activeElement && document.activeElement.classList.contains('seg-marker'),
  focused_seg: document.activeElement ? document.activeElement.getAttribute('data-seg') : null,
  readout: document.getElementById('readout') ? document.getElementById('readout').textContent : '',
  cursor_visible: !!document.getElementById('tl-cursor') && !document.getElementById('tl-cursor').hidden,
  violations: window.__violations
})
"""


class Browser:
    # host_rules: Chromium's --host-resolver-rules; by default no name (and no
    # address) resolves, so a page cannot reach any server.
    def __init__(self, chromium, profile, deadline_s, host_rules='MAP * ~NOTFOUND'):
        to_browser_r, self.to_browser = os.pipe()
        self.from_browser, from_browser_w = os.pipe()

        def wire_fds():
            # The pipe ends may already sit on 3 or 4: move them out of the
            # way first, then place them and make them survive exec.
            high_r = fcntl.fcntl(to_browser_r, fcntl.F_DUPFD, 10)
            high_w = fcntl.fcntl(from_browser_w, fcntl.F_DUPFD, 10)
            os.dup2(high_r, 3, inheritable=True)
            os.dup2(high_w, 4, inheritable=True)

        args = [chromium, '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic',
                '--no-first-run', '--disable-background-networking', '--disable-component-update',
                '--disable-sync', '--disable-extensions', '--disable-default-apps',
                '--host-resolver-rules=' + host_rules, '--remote-debugging-pipe',
                '--user-data-dir=' + profile, '--hide-scrollbars', 'about:blank']
        # Python's own fds are not inheritable, so only 0-4 reach the browser.
        self.proc = subprocess.Popen(args, preexec_fn=wire_fds, close_fds=False,
                                     stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
                                     stderr=(None if os.environ.get("PAGE_CHECK_VERBOSE") else subprocess.DEVNULL))
        os.close(to_browser_r)
        os.close(from_browser_w)
        self.next_id = 0
        self.buffer = b''
        self.events = []
        self.deadline_s = deadline_s
        self.deadline = time.monotonic() + deadline_s

    def send(self, method, params=None, session=None):
        self.next_id += 1
        msg = {'id': self.next_id, 'method': method, 'params': params or {}}
        if session:
            msg['sessionId'] = session
        os.write(self.to_browser, json.dumps(msg).encode() + b'\0')
        return self.next_id

    def _read_message(self):
        while b'\0' not in self.buffer:
            left = self.deadline - time.monotonic()
            if left <= 0:
                raise TimeoutError('the browser did not answer within %d s' % self.deadline_s)
            ready, _, _ = select.select([self.from_browser], [], [], left)
            if not ready:
                continue
            chunk = os.read(self.from_browser, 1 << 20)
            if not chunk:
                raise EOFError('the browser closed the DevTools pipe')
            self.buffer += chunk
        raw, self.buffer = self.buffer.split(b'\0', 1)
        return json.loads(raw)

    def call(self, method, params=None, session=None):
        want = self.send(method, params, session)
        while True:
            msg = self._read_message()
            if msg.get('id') == want:
                if 'error' in msg:
                    raise RuntimeError('%s failed: %s' % (method, msg['error']))
                return msg.get('result', {})
            self.events.append(msg)

    def wait_event(self, method, session):
        for i, ev in enumerate(self.events):
            if ev.get('method') == method and ev.get('sessionId') == session:
                return self.events.pop(i)
        while True:
            msg = self._read_message()
            if msg.get('method') == method and msg.get('sessionId') == session:
                return msg
            self.events.append(msg)

    def close(self):
        try:
            self.send('Browser.close')
            self.proc.wait(timeout=5)
        except Exception:
            self.proc.kill()
            self.proc.wait()


def evaluate(browser, session, expression):
    result = browser.call('Runtime.evaluate', {'expression': expression, 'returnByValue': True}, session)
    if 'exceptionDetails' in result:
        raise RuntimeError('evaluating a check failed: %s' % result['exceptionDetails'])
    return json.loads(result['result']['value'])


def check(chromium, page, screenshot, literals_file=None, deadline_s=DEADLINE_S):
    profile = tempfile.mkdtemp(prefix='clipwarden-chromium-')
    browser = Browser(chromium, profile, deadline_s)
    try:
        target = browser.call('Target.createTarget', {'url': 'about:blank'})['targetId']
        session = browser.call('Target.attachToTarget', {'targetId': target, 'flatten': True})['sessionId']
        for domain in ('Page', 'Runtime', 'Log', 'Network'):
            browser.call(domain + '.enable', {}, session)
        browser.call('Page.addScriptToEvaluateOnNewDocument', {'source': PRELUDE}, session)
        browser.call('Emulation.setDeviceMetricsOverride',
                     {'width': 1280, 'height': 900, 'deviceScaleFactor': 1, 'mobile': False}, session)
        page_url = pathlib.Path(page).resolve().as_uri()
        browser.call('Page.navigate', {'url': page_url}, session)
        browser.wait_event('Page.loadEventFired', session)
        dom = evaluate(browser, session, DOM_FACTS)
        hostile = None
        if literals_file:
            literals = json.loads(pathlib.Path(literals_file).read_text(encoding='utf-8'))
            hostile = evaluate(browser, session, HOSTILE_FACTS % json.dumps(literals))
        # Keyboard: "n" focuses the first flagged segment.
        for kind in ('keyDown', 'keyUp'):
            browser.call('Input.dispatchKeyEvent',
                         {'type': kind, 'key': 'n', 'code': 'KeyN', 'text': 'n' if kind == 'keyDown' else '',
                          'windowsVirtualKeyCode': 78}, session)
        after_key = evaluate(browser, session, AFTER_KEY)
        browser.call('Runtime.evaluate', {'expression': 'document.activeElement.blur(); window.scrollTo(0, 0)'},
                     session)
        if os.environ.get('PAGE_CHECK_MEDIA'):  # e.g. "print", to look at the print styles
            browser.call('Emulation.setEmulatedMedia', {'media': os.environ['PAGE_CHECK_MEDIA']}, session)
            dom['page_height'] = evaluate(browser, session, 'JSON.stringify(document.documentElement.scrollHeight)')
        height = min(int(dom['page_height']), 16000)
        browser.call('Emulation.setDeviceMetricsOverride',
                     {'width': 1280, 'height': height, 'deviceScaleFactor': 1, 'mobile': False}, session)
        shot = browser.call('Page.captureScreenshot', {'format': 'png'}, session)
        pathlib.Path(screenshot).write_bytes(base64.b64decode(shot['data']))
        # Let late console messages arrive.
        browser.call('Runtime.evaluate', {'expression': '1'}, session)
    finally:
        browser.close()
        shutil.rmtree(profile, ignore_errors=True)

    console_errors, exceptions, log_errors, requests = [], [], [], []
    for ev in browser.events:
        method, params = ev.get('method'), ev.get('params', {})
        if method == 'Runtime.consoleAPICalled' and params.get('type') in ('error', 'assert'):
            console_errors.append(' '.join(str(a.get('value', a.get('description', ''))) for a in params['args']))
        elif method == 'Runtime.exceptionThrown':
            exceptions.append(params['exceptionDetails'].get('text', '') + ' ' +
                              str(params['exceptionDetails'].get('exception', {}).get('description', '')))
        elif method == 'Log.entryAdded' and params['entry'].get('level') in ('error', 'warning'):
            log_errors.append(params['entry'].get('source', '') + ': ' + params['entry'].get('text', ''))
        elif method == 'Network.requestWillBeSent':
            url = params['request']['url']
            if not url.startswith('data:') and url != page_url:
                requests.append(url)
    return {'console_errors': console_errors, 'exceptions': exceptions, 'log_errors': log_errors,
            'requests': requests, 'dom': dom, 'after_key': after_key, 'hostile': hostile}


def main():
    if len(sys.argv) not in (4, 5):
        print(__doc__, file=sys.stderr)
        return 2
    try:
        try:
            result = check(*sys.argv[1:])
        except TimeoutError:
            # Chromium can take most of the deadline just to start on a
            # loaded 2-core machine (tests run two at a time): one more try
            # with twice the time. A page that hangs the browser still
            # fails, after both.
            result = check(*sys.argv[1:], deadline_s=2 * DEADLINE_S)
        print(json.dumps(result))
    except Exception as e:  # one line for the test's failure message
        print('page_check: %s: %s' % (type(e).__name__, e), file=sys.stderr)
        return 1
    return 0


if __name__ == '__main__':
    sys.exit(main())
