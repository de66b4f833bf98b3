"""Check an HTML page with Python's standard html.parser (the HTML5
tokenizer rules of the WHATWG spec, as Python implements them): a doctype,
<html lang>, a non-empty <title>, every non-void element closed in order
(void elements per the WHATWG HTML list), ids unique, every <button> named
by text or aria-label, every table header cell scoped, no external
reference in src/href/xlink:href/action/srcset/url(...)/@import.

Usage: html_check.py FILE.html ; prints "ok" or the problems, one a line.
"""
import re
import sys
from html.parser import HTMLParser

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link",
        "meta", "source", "track", "wbr"}
# Elements of inline SVG that the page writes self-closed or closed.
problems = []


class Check(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack = []
        self.ids = set()
        self.doctype = False
        self.lang = None
        self.title = None
        self.in_title = False
        self.button = None

    def handle_decl(self, decl):
        if decl.lower() == "doctype html":
            self.doctype = True

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "html":
            self.lang = a.get("lang")
        if "id" in a:
            if a["id"] in self.ids:
                problems.append("duplicate id " + a["id"])
            self.ids.add(a["id"])
        for k in ("src", "href", "xlink:href", "action", "srcset", "poster", "data"):
            v = a.get(k)
            if v is not None and not v.startswith("#"):
                problems.append("external reference %s=%r on <%s>" % (k, v, tag))
        if tag == "th" and self.stack and "thead" in self.stack and a.get("scope") != "col":
            problems.append("header cell without scope=col")
        if tag == "button":
            self.button = [a.get("aria-label") or ""]
        if tag == "title" and "svg" not in self.stack:
            self.in_title = True
            self.title = ""
        if tag not in VOID:
            self.stack.append(tag)

    def handle_startendtag(self, tag, attrs):
        self.handle_starttag(tag, attrs)
        if tag not in VOID:
            self.stack.pop()

    def handle_endtag(self, tag):
        if tag in VOID:
            problems.append("end tag for void element " + tag)
            return
        if not self.stack or self.stack[-1] != tag:
            problems.append("</%s> closes <%s>" % (tag, self.stack[-1] if self.stack else "nothing"))
            if tag in self.stack:
                while self.stack and self.stack.pop() != tag:
                    pass
            return
        self.stack.pop()
        if tag == "title":
            self.in_title = False
        if tag == "button":
            if not "".join(self.button).strip():
                problems.append("button without a name")
            self.button = None

    def handle_data(self, data):
        if self.in_title:
            self.title += data
        if self.button is not None:
            self.button.append(data)


text = open(sys.argv[1], encoding="utf-8").read()
c = Check()
c.feed(text)
c.close()
if not c.doctype:
    problems.append("no <!DOCTYPE html>")
if not c.lang:
    problems.append("no lang on <html>")
if not (c.title or "").strip():
    problems.append("empty <title>")
if c.stack:
    problems.append("unclosed elements: " + " ".join(c.stack))
for m in re.finditer(r"url\(\s*['\"]?([^'\")]*)", text):
    if not m.group(1).startswith("#"):
        problems.append("external url(%s)" % m.group(1))
if re.search(r"@import", text):
    problems.append("@import")
print("\n".join(problems) if problems else "ok")
