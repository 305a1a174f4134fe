#!/usr/bin/python3
"""Works a `clipwarden review` queue in headless Chromium, as a person would.

Usage: review_flow.py CHROMIUM QUEUE_URL SCREENSHOT_DIR

Drives Chromium over the DevTools pipe (page_check.Browser; only 127.0.0.1
resolves): opens the queue, opens the first undecided clip with "u", plays
the video, clicks the first flagged segment's mark (the video must jump to
its start) and the middle of the timeline (the video must follow), decides
three clips with the keys r, k and s (each opens the next undecided clip),
then reloads the queue. Keeps a screenshot of each screen in SCREENSHOT_DIR
(queue.png, clip.png, clip-segment.png, queue-after.png). Prints one JSON
object of what it saw; exits 1 when the browser could not be driven.
"""
import base64
import json
import os
import pathlib
import shutil
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import page_check  # noqa: E402

DEADLINE_S = 90

QUEUE_FACTS = """JSON.stringify({
  rows: document.querySelectorAll('#rows .row').length,
  left: document.getElementById('left').textContent,
  decided: Array.prototype.map.call(document.querySelectorAll('#rows .row'), function (r) { return r.dataset.decision; }),
  strips: Array.prototype.filter.call(document.images, function (i) { return i.complete && i.naturalWidth > 0; }).length,
  headlines: document.querySelectorAll('.headline').length,
  violations: window.__violations, path: location.pathname
})"""

CLIP_FACTS = """JSON.stringify({
  path: location.pathname,
  ready: document.getElementById('video') ? document.getElementById('video').readyState : -1,
  time: document.getElementById('video') ? document.getElementById('video').currentTime : -1,
  paused: document.getElementById('video') ? document.getElementById('video').paused : null,
  marks: document.querySelectorAll('#marks button').length,
  cursor_x: Number(document.querySelector('#timeline .cursor').getAttribute('x1')),
  readout: document.getElementById('readout').textContent,
  segments: JSON.parse(document.getElementById('clip-data').textContent).segments,
  current: document.getElementById('current-decision').textContent,
  violations: window.__violations
})"""


def shot(browser, session, path):
    data = browser.call('Page.captureScreenshot', {'format': 'png'}, session)['data']
    pathlib.Path(path).write_bytes(base64.b64decode(data))


def key(browser, session, k):
    for kind in ('keyDown', 'keyUp'):
        browser.call('Input.dispatchKeyEvent',
                     {'type': kind, 'key': k, 'code': 'Key' + k.upper(), 'text': k if kind == 'keyDown' else '',
                      'windowsVirtualKeyCode': ord(k.upper())}, session)


def facts(browser, session, expression):
    return page_check.evaluate(browser, session, expression)


def wait_for(browser, session, expression, what, timeout_s=30):
    """Polls a boolean expression until it holds (the page works at its own pace)."""
    end = time.monotonic() + timeout_s
    while time.monotonic() < end:
        if facts(browser, session, 'JSON.stringify(!!(%s))' % expression):
            return True
        time.sleep(0.1)
    raise TimeoutError('waited %d s for %s' % (timeout_s, what))


def run(chromium, url, out_dir):
    out = pathlib.Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    profile = tempfile.mkdtemp(prefix='clipwarden-review-')
    browser = page_check.Browser(chromium, profile, DEADLINE_S, 'MAP * ~NOTFOUND, EXCLUDE 127.0.0.1')
    seen = {}
    try:
        target = browser.call('Target.createTarget', {'url': 'about:blank'})['targetId']
        session = browser.call('Target.attachToTarget', {'targetId': target, 'flatten': True})['sessionId']
        for domain in ('Page', 'Runtime', 'Log'):
            browser.call(domain + '.enable', {}, session)
        browser.call('Page.addScriptToEvaluateOnNewDocument', {'source': page_check.PRELUDE}, session)
        browser.call('Emulation.setDeviceMetricsOverride',
                     {'width': 1280, 'height': 1100, 'deviceScaleFactor': 1, 'mobile': False}, session)

        def load(action):
            action()
            browser.wait_event('Page.loadEventFired', session)

        load(lambda: browser.call('Page.navigate', {'url': url}, session))
        wait_for(browser, session, "Array.prototype.every.call(document.images, function (i) { return i.complete; })",
                 'the frame strips')
        seen['queue'] = facts(browser, session, QUEUE_FACTS)
        shot(browser, session, out / 'queue.png')

        load(lambda: key(browser, session, 'u'))
        wait_for(browser, session, "document.getElementById('video').readyState >= 2", 'the video to load')
        browser.call('Runtime.evaluate', {'expression': "document.getElementById('video').muted = true; "
                                                         "document.getElementById('video').play()",
                                          'userGesture': True, 'awaitPromise': True}, session)
        wait_for(browser, session, "document.getElementById('video').currentTime > 0.3", 'the video to play')
        seen['playing'] = facts(browser, session, CLIP_FACTS)
        shot(browser, session, out / 'clip.png')

        browser.call('Runtime.evaluate', {'expression': "document.querySelector('#marks button').click()"}, session)
        wait_for(browser, session, "document.getElementById('video').paused && !document.getElementById('video').seeking",
                 'the jump to the segment')
        seen['segment'] = facts(browser, session, CLIP_FACTS)
        shot(browser, session, out / 'clip-segment.png')

        # A click in the middle of the timeline moves the video to the middle.
        box = facts(browser, session, "JSON.stringify(document.querySelector('#timeline svg').getBoundingClientRect())")
        x, y = box['x'] + box['width'] / 2, box['y'] + box['height'] / 2
        for kind in ('mousePressed', 'mouseReleased'):
            browser.call('Input.dispatchMouseEvent', {'type': kind, 'x': x, 'y': y, 'button': 'left', 'clickCount': 1},
                         session)
        wait_for(browser, session, "!document.getElementById('video').seeking", 'the seek from the timeline')
        seen['timeline_click'] = facts(browser, session, CLIP_FACTS)

        seen['decided'] = []
        for k in ('r', 'k', 's'):
            before = facts(browser, session, 'JSON.stringify(location.pathname)')
            load(lambda: key(browser, session, k))
            seen['decided'].append({'key': k, 'clip': before,
                                    'then': facts(browser, session, 'JSON.stringify(location.pathname)')})

        load(lambda: browser.call('Page.navigate', {'url': url}, session))
        wait_for(browser, session, "Array.prototype.every.call(document.images, function (i) { return i.complete; })",
                 'the frame strips')
        seen['queue_after'] = facts(browser, session, QUEUE_FACTS)
        shot(browser, session, out / 'queue-after.png')
    finally:
        browser.close()
        shutil.rmtree(profile, ignore_errors=True)
    errors = []
    for ev in browser.events:
        method, params = ev.get('method'), ev.get('params', {})
        if method == 'Runtime.exceptionThrown':
            errors.append(params['exceptionDetails'].get('text', ''))
        elif method == 'Log.entryAdded' and params['entry'].get('level') == 'error':
            errors.append(params['entry'].get('text', ''))
    seen['errors'] = errors
    return seen


def main():
    if len(sys.argv) != 4:
        print(__doc__, file=sys.stderr)
        return 2
    try:
        print(json.dumps(run(*sys.argv[1:])))
    except Exception as e:  # one line for the test's failure message
        print('review_flow: %s: %s' % (type(e).__name__, e), file=sys.stderr)
        return 1
    return 0


if __name__ == '__main__':
    sys.exit(main())
