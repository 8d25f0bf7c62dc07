"""Helpers the browser tests share: accessibility checks with axe-core (through
axe-playwright-python, which ships axe), keyboard focus checks, screenshots, and the finger
stroke of the signing pad.

    assert_accessible(page, name)   axe on the current page: fails listing every serious or
                                    critical violation; the full result is saved as JSON
                                    under var/test-results/
    tab_through(page, limit)        Tab from the top of the page; every element reached,
                                    with whether it showed a focus indicator
    assert_keyboard_reachable(page, name)   every control reached by Tab, each with a
                                    visible focus indicator of 3:1, none covered
    shoot(page, name, folder)       a full-page screenshot
    finger_stroke(page, canvas)     a finger drawn across a canvas with real touch events
"""

from __future__ import annotations

import json
import re
from pathlib import Path

from axe_playwright_python.sync_playwright import Axe
from django.conf import settings

RESULTS = Path(settings.BASE_DIR) / "var" / "test-results"
# WCAG 2.0–2.2 A and AA and axe's best practices: contrast (color-contrast, WCAG 1.4.3),
# names of controls, landmarks and heading order among them.
AXE_OPTIONS = {
    "resultTypes": ["violations"],
    "runOnly": {
        "type": "tag",
        "values": ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa", "best-practice"],
    },
}
BLOCKING_IMPACTS = ("serious", "critical")

_axe = Axe()


def _slug(name: str) -> str:
    return re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-") or "page"


def axe_violations(page, name: str) -> list[dict]:
    """Run axe on the page as it is now; save its answer; return the serious and critical
    violations."""
    page.wait_for_load_state("load")  # not half way through a navigation a tap started
    results = _axe.run(page, options=AXE_OPTIONS)
    RESULTS.mkdir(parents=True, exist_ok=True)
    (RESULTS / f"axe-{_slug(name)}.json").write_text(
        json.dumps(
            {
                "url": page.url,
                "violations": results.response["violations"],
                # What axe could not decide (e.g. text over an image): for a person to look at.
                "incomplete": results.response.get("incomplete", []),
            },
            indent=1,
        )
    )
    return [v for v in results.response["violations"] if v["impact"] in BLOCKING_IMPACTS]


def describe(violations: list[dict]) -> str:
    lines = []
    for violation in violations:
        lines.append(
            f"{violation['id']} ({violation['impact']}): {violation['help']}"
            f" <{violation.get('helpUrl', '')}>"
        )
        for node in violation["nodes"]:
            target = " ".join(str(part) for part in node["target"])
            summary = " ".join(node.get("failureSummary", "").split())
            lines.append(f"    at {target}: {summary}")
    return "\n".join(lines)


def assert_accessible(page, name: str) -> None:
    """0 serious or critical violations on the page as shown, or a failure naming each
    rule, its impact, where it failed and what it asks for; a screenshot beside the JSON."""
    violations = axe_violations(page, name)
    if violations:
        shoot(page, f"axe-{name}", RESULTS)
        raise AssertionError(f"axe on {name} ({page.url}):\n{describe(violations)}")


def shoot(page, name: str, folder: Path = RESULTS) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    target = folder / f"{_slug(name)}.png"
    page.screenshot(path=str(target), full_page=True)
    return target


# What the element in focus looks like, and what it looks like once focus leaves it: a
# focus indicator is an outline or a box-shadow (or a changed border or background) that
# only the focused state has.
# A control drawn transparent over its label's box (the checklist's choices) shows focus on
# that box, its next sibling: measure what is seen.
_SHOWN = """const shown = (el) => getComputedStyle(el).opacity === "0" && el.nextElementSibling
  ? el.nextElementSibling : el;
"""
_FOCUS_STYLE = (
    """(el) => {
  """
    + _SHOWN
    + """const s = getComputedStyle(shown(el));
  return {outline: s.outlineStyle !== "none" && parseFloat(s.outlineWidth) > 0
            ? `${s.outlineStyle} ${s.outlineWidth} ${s.outlineColor}` : "",
          shadow: s.boxShadow === "none" ? "" : s.boxShadow,
          border: s.borderColor, background: s.backgroundColor};
}"""
)

# The best contrast of the focus indicator's colours (outline, box-shadow rings) against
# the background it is drawn on (the nearest ancestor's), by WCAG 2.2's relative luminance:
# a focus indicator needs 3:1 against what is next to it (SC 1.4.11, non-text contrast).
_INDICATOR_CONTRAST = (
    """(el) => {
  """
    + _SHOWN
    + """el = shown(el);
  const channel = (v) => { v /= 255;
                           return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4; };
  const lum = (c) => { const [r, g, b] = c.match(/[\\d.]+/g).map(Number);
                       return 0.2126 * channel(r) + 0.7152 * channel(g) + 0.0722 * channel(b); };
  const ratio = (a, b) => { const [x, y] = [lum(a), lum(b)].sort((p, q) => q - p);
                            return (x + 0.05) / (y + 0.05); };
  const opaque = (c) => c && c !== "transparent" && !/^rgba\\(.*,\\s*0\\)$/.test(c);
  let node = el.parentElement, ground = "rgb(255, 255, 255)";
  while (node) { const c = getComputedStyle(node).backgroundColor;
                 if (opaque(c)) { ground = c; break; } node = node.parentElement; }
  const s = getComputedStyle(el), colours = [];
  if (s.outlineStyle !== "none" && parseFloat(s.outlineWidth) > 0) colours.push(s.outlineColor);
  if (s.boxShadow !== "none") colours.push(...(s.boxShadow.match(/rgba?\\([^)]*\\)/g) || []));
  return Math.max(0, ...colours.filter(opaque).map((c) => ratio(c, ground)));
}"""
)

_DESCRIBE_ACTIVE = """() => {
  const el = document.activeElement;
  if (!el || el === document.body) return null;
  const box = el.getBoundingClientRect();
  // What is drawn at the middle of the focused element, once the browser has scrolled it
  // into view: the element itself (or its own label or content), or something covering
  // it, such as a sticky bar (WCAG 2.2 SC 2.4.11, focus not obscured).
  const hit = document.elementFromPoint(box.left + box.width / 2, box.top + box.height / 2);
  const own = hit && (el.contains(hit) || hit.contains(el)
                      || (el.labels && Array.from(el.labels).some((l) => l.contains(hit))));
  return {tag: el.tagName.toLowerCase(), type: el.type || "", id: el.id,
          text: (el.getAttribute("aria-label") || el.innerText || el.name || "").trim()
                .slice(0, 60),
          visible: box.width > 0 && box.height > 0,
          obscured: !own,
          key: el.outerHTML.slice(0, 160)};
}"""

# Interactive elements a keyboard user must be able to reach (hidden ones excluded) that
# Tab did not reach: tab_through marks each element it reaches with a property (not an
# attribute, so the page's markup is left as it is; two links alike stay two).
_NOT_REACHED = """() => Array.from(document.querySelectorAll(
    'a[href], button, input:not([type=hidden]), select, textarea, summary, [tabindex]'))
  .filter((el) => !el.disabled && el.tabIndex >= 0 && el.getClientRects().length > 0
    && getComputedStyle(el).visibility !== "hidden" && !el.__tabReached)
  // A group of radio buttons is one stop for Tab (the arrow keys move within it).
  .filter((el) => el.type !== "radio" || !Array.from(
    document.querySelectorAll(`input[type=radio][name="${el.name}"]`)).some((r) => r.__tabReached))
  .map((el) => el.outerHTML.slice(0, 160))"""
_MARK_ACTIVE = """() => { const el = document.activeElement;
  if (!el || el === document.body || el.__tabReached) return false;
  el.__tabReached = true; return true; }"""


def tab_through(page, limit: int = 300) -> list[dict]:
    """Press Tab from the top until focus comes back round (or `limit` presses); for each
    element reached, whether its focused style differs from its unfocused one, the
    contrast of its indicator and whether anything covers it."""
    # Start from the top of the document: a focusable marker put first in the body (the
    # sequential focus starting point otherwise stays where the last click was).
    page.evaluate(
        """() => { const start = document.createElement("span"); start.tabIndex = -1;
                   start.id = "__tab_start"; document.body.prepend(start); start.focus(); }"""
    )
    reached: list[dict] = []
    for _ in range(limit):
        page.keyboard.press("Tab")
        page.evaluate("() => document.getElementById('__tab_start')?.remove()")
        if not page.evaluate(_MARK_ACTIVE):
            break  # back at the start, or out of the page
        active = page.evaluate(_DESCRIBE_ACTIVE)
        handle = page.evaluate_handle("document.activeElement")
        focused = handle.evaluate(_FOCUS_STYLE)
        active["contrast"] = round(handle.evaluate(_INDICATOR_CONTRAST), 2)
        handle.evaluate("(el) => el.blur()")
        unfocused = handle.evaluate(_FOCUS_STYLE)
        handle.evaluate("(el) => el.focus({preventScroll: true})")
        active["indicator"] = focused != unfocused and bool(focused["outline"] or focused["shadow"])
        reached.append(active)
    return reached


def assert_keyboard_reachable(page, name: str) -> list[dict]:
    """Every interactive element on the page is reached by Tab, and each shows a focus
    indicator (an outline or a ring) that its unfocused state does not have, in a colour
    of at least 3:1 against the background it is drawn on, and nothing covers it."""
    reached = tab_through(page)
    missing = page.evaluate(_NOT_REACHED)
    assert not missing, f"{name}: not reached by Tab:\n" + "\n".join(missing)
    unmarked = [entry["key"] for entry in reached if not entry["indicator"]]
    assert not unmarked, f"{name}: no visible focus indicator:\n" + "\n".join(unmarked)
    covered = [entry["key"] for entry in reached if entry["obscured"]]
    assert not covered, f"{name}: focused but covered:\n" + "\n".join(covered)
    faint = [f"{e['contrast']}:1 {e['key']}" for e in reached if e["contrast"] < 3]
    assert not faint, f"{name}: focus indicator under 3:1 against its ground:\n" + "\n".join(faint)
    return reached


def finger_stroke(page, canvas) -> None:
    """A finger drawn across the pad: real touch events through the DevTools protocol, so
    the page sees pointer events of type "touch" as on a tablet."""
    box = canvas.bounding_box()
    cdp = page.context.new_cdp_session(page)
    x, y = box["x"] + 40, box["y"] + box["height"] * 0.6
    cdp.send("Input.dispatchTouchEvent", {"type": "touchStart", "touchPoints": [{"x": x, "y": y}]})
    for step in range(1, 30):
        point = {"x": x + step * 15, "y": y - (step % 6) * 12}
        cdp.send("Input.dispatchTouchEvent", {"type": "touchMove", "touchPoints": [point]})
    cdp.send("Input.dispatchTouchEvent", {"type": "touchEnd", "touchPoints": []})
