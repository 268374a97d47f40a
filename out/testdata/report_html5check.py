#!/usr/bin/python3
"""Parse an accelplan HTML report with html5lib and print what it found as JSON.

Reference: html5lib 1.1 (Debian python3-html5lib), an implementation of the
WHATWG HTML parsing algorithm, run as /usr/bin/python3:

    /usr/bin/python3 report_html5check.py report.html

It is called by out/report_test.go on a report the test has just written;
nothing is stored. Printed keys:

  errors        parse errors html5lib reports (list of [line, col, code])
  title         text of <title>
  h1            text of the first <h1>
  sections      ids of the <section> elements, in document order
  recommendation  text of section#recommendation (whitespace collapsed)
  caution       text of the .caution element inside it, or null
  candidates    for each <article class="cand ...">, in order:
                {id, classes, label (h3 text), time (data-time), figures
                 (number of <figure>), imgs (number of <img>), hidden}
  refs          every src and href attribute value, cut to 40 characters
  data_uris     the number of src attributes that are data: URIs
  stepper_hidden  whether #stepper carries the hidden attribute
  scripts       number of <script> elements, and how many have a src
"""
import json
import re
import sys

import html5lib

assert html5lib.__version__ == "1.1", html5lib.__version__


def text(el):
    return re.sub(r"\s+", " ", "".join(el.itertext())).strip()


def classes(el):
    return (el.get("class") or "").split()


def main(path):
    with open(path, "rb") as f:
        raw = f.read()
    parser = html5lib.HTMLParser(namespaceHTMLElements=False)
    doc = parser.parse(raw)
    out = {"errors": [[pos[0], pos[1], code] for pos, code, _ in parser.errors]}
    t = doc.find(".//title")
    out["title"] = text(t) if t is not None else None
    h1 = doc.find(".//h1")
    out["h1"] = text(h1) if h1 is not None else None
    out["sections"] = [s.get("id") for s in doc.iter("section")]
    rec = next((s for s in doc.iter("section") if s.get("id") == "recommendation"), None)
    out["recommendation"] = text(rec) if rec is not None else None
    caution = None
    if rec is not None:
        for el in rec.iter():
            if "caution" in classes(el):
                caution = text(el)
                break
    out["caution"] = caution
    cands = []
    for a in doc.iter("article"):
        if "cand" not in classes(a):
            continue
        h3 = a.find(".//h3")
        cands.append({
            "id": a.get("id"),
            "classes": classes(a),
            "label": text(h3) if h3 is not None else None,
            "time": a.get("data-time"),
            "figures": len(list(a.iter("figure"))),
            "imgs": len(list(a.iter("img"))),
            "hidden": a.get("hidden") is not None,
        })
    out["candidates"] = cands
    refs = []
    data = 0
    for el in doc.iter():
        for attr in ("src", "href"):
            v = el.get(attr)
            if v is None:
                continue
            refs.append(v[:40])
            if attr == "src" and v.startswith("data:"):
                data += 1
    out["refs"] = refs
    out["data_uris"] = data
    st = next((el for el in doc.iter() if el.get("id") == "stepper"), None)
    out["stepper_hidden"] = st is not None and st.get("hidden") is not None
    scripts = list(doc.iter("script"))
    out["scripts"] = [len(scripts), sum(1 for s in scripts if s.get("src") is not None)]
    json.dump(out, sys.stdout, ensure_ascii=False)


if __name__ == "__main__":
    main(sys.argv[1])
