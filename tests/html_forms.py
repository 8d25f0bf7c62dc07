"""Read the fields of a rendered HTML form, the way a browser would submit it untouched.

The hostile-input tests start from what a page offers (names, current values, the
selected option) and then change one field at a time."""

from __future__ import annotations

from html.parser import HTMLParser


class _FormReader(HTMLParser):
    def __init__(self, action_contains: str | None) -> None:
        super().__init__(convert_charrefs=True)
        self.action_contains = action_contains
        self.forms: list[dict] = []
        self._form: dict | None = None
        self._select: str | None = None
        self._select_first: str | None = None
        self._select_chosen = False
        self._textarea: str | None = None
        self._text: list[str] = []

    def handle_starttag(self, tag: str, attrs_list) -> None:
        attrs = {k: (v if v is not None else "") for k, v in attrs_list}
        if tag == "form":
            self._form = {
                "action": attrs.get("action", ""),
                "method": attrs.get("method", "get"),
                "fields": [],
            }
            return
        if self._form is None:
            return
        name = attrs.get("name")
        if tag == "input" and name:
            kind = attrs.get("type", "text").lower()
            if kind in ("submit", "button", "image", "reset", "file"):
                return
            if kind in ("checkbox", "radio") and "checked" not in attrs:
                return
            self._form["fields"].append(
                (name, attrs.get("value", "on" if kind in ("checkbox", "radio") else ""))
            )
        elif tag == "select" and name:
            self._select, self._select_first, self._select_chosen = name, None, False
        elif tag == "option" and self._select:
            value = attrs.get("value", "")
            if self._select_first is None:
                self._select_first = value
            if "selected" in attrs and not self._select_chosen:
                self._form["fields"].append((self._select, value))
                self._select_chosen = True
        elif tag == "textarea" and name:
            self._textarea, self._text = name, []

    def handle_data(self, data: str) -> None:
        if self._textarea is not None:
            self._text.append(data)

    def handle_endtag(self, tag: str) -> None:
        if self._form is None:
            return
        if tag == "select" and self._select:
            if not self._select_chosen and self._select_first is not None:
                self._form["fields"].append((self._select, self._select_first))
            self._select = None
        elif tag == "textarea" and self._textarea is not None:
            self._form["fields"].append((self._textarea, "".join(self._text).lstrip("\n")))
            self._textarea = None
        elif tag == "form":
            self.forms.append(self._form)
            self._form = None


def form_fields(html: str, *, action_contains: str | None = None) -> dict[str, list[str]]:
    """The submitted fields of the page's POST form (the one whose action contains
    `action_contains`, else the first POST form with more than a CSRF token)."""
    reader = _FormReader(action_contains)
    reader.feed(html)
    candidates = [f for f in reader.forms if f["method"].lower() == "post"]
    if action_contains is not None:
        candidates = [f for f in candidates if action_contains in f["action"]] or candidates
    candidates = [f for f in candidates if len(f["fields"]) > 1] or candidates
    if not candidates:
        raise AssertionError("the page has no POST form")
    data: dict[str, list[str]] = {}
    for name, value in candidates[0]["fields"]:
        data.setdefault(name, []).append(value)
    return data
