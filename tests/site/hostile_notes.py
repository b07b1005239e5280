"""Hostile Markdown links for the notes, one per class of attack (shared by the unit and
the real-browser tests).

Each payload sets ``window.__pwned`` to its own number when it runs. The classes come
from how browsers decode a URL: character references are resolved before the scheme is
read (HTML Living Standard, "character references"), and the WHATWG URL Standard's basic
URL parser removes tabs and newlines anywhere and treats ``\\`` like ``/`` in http(s)
URLs, so ``/\\host`` is another host.
"""

HOSTILE_LINKS = {
    "named entity colon": "[e1](javascript&colon;window.__pwned=11)",
    "decimal entity": "[e2](&#106;avascript:window.__pwned=12)",
    "hex entity": "[e3](jav&#x61;script:window.__pwned=13)",
    "all hex entities": "[e4](&#x6A;&#x61;vascript&#x3A;window.__pwned=14)",
    "padded decimal entity": "[e5](&#0000106;avascript:window.__pwned=15)",
    "tab entity": "[e6](java&Tab;script:window.__pwned=16)",
    "newline entity": "[e7](java&NewLine;script:window.__pwned=17)",
    "literal tab": "[e8](java\tscript:window.__pwned=18)",
    "mixed case, spaces": "[e9](  JaVaScRiPt:window.__pwned=19)",
    "angle-bracket destination": "[e10](<javascript:window.__pwned=20>)",
    "reference-style definition": "[e11][ref]\n\n[ref]: javascript:window.__pwned=21",
    "reference with entity": "[e12][ref2]\n\n[ref2]: &#106;avascript:window.__pwned=22",
    "table cell": "| a | b |\n| --- | --- |\n| [e13](jav&#x61;script:window.__pwned=23) | x |",
    "vbscript": "[e14](vbscript:msgbox(24))",
    "data html": "[e15](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)",
    "data entity": "[e16](&#100;ata:text/html,<b>x</b>)",
    "backslash host": "[e17](/\\evil.example/x)",
    "protocol-relative": "[e18](//evil.example/x)",
    "backslash pair": "[e19](\\\\evil.example/x)",
    "file scheme": "[e20](file:///etc/passwd)",
    "link title breakout": '[e21](https://ok.example "a\\" onclick=\\"window.__pwned=25")',
    "image onerror": "![x\" onerror=\"window.__pwned=26](x)",
}

#: Links that must keep their target (same text rendered, href unchanged).
BENIGN_LINKS = {
    "[web](https://example.org/a?b=1#c)": "https://example.org/a?b=1#c",
    "[plain](http://example.org/)": "http://example.org/",
    "[mail](mailto:someone@example.org)": "mailto:someone@example.org",
    "[page](systems/s1.html#checks)": "systems/s1.html#checks",
    "[up](../index.html)": "../index.html",
    "[here](#notes)": "#notes",
}
