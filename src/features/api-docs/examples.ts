/**
 * The copy-paste examples of the API reference page; README.md carries the same Python script
 * (tests/client/api-docs.test.ts checks that the two agree, and tests/e2e/scripts.spec.ts runs it
 * against a real server).
 */

export const PYTHON_EXAMPLE = `"""Submit an entry to Parallax from a script. Standard library only (Python 3.8+)."""
import json
import os
import urllib.error
import urllib.request
import uuid

BASE = os.environ.get("PARALLAX_URL", "http://localhost:3000")
KEY = os.environ["PARALLAX_KEY"]  # the team's API key (team page; shown once)
CHALLENGE = os.environ.get("PARALLAX_CHALLENGE", "ring-36-correlators")


def call(method, path, body=None, headers=None):
    """One request; on an error, print every problem with its JSON pointer and stop."""
    data = None if body is None else json.dumps(body).encode("utf-8")
    req = urllib.request.Request(BASE + path, data=data, method=method, headers={
        "x-api-key": KEY, "content-type": "application/json", **(headers or {})})
    try:
        with urllib.request.urlopen(req, timeout=120) as r:
            return r.status, json.load(r)
    except urllib.error.HTTPError as e:
        err = json.load(e)["error"]
        for p in err.get("problems") or []:
            print(f"  {p['path'] or '(document)'}: {p['message']}")
        raise SystemExit(f"{method} {path}: HTTP {e.code}: {err['message']}")


def estimate(target):
    """Your method goes here: the value and its standard uncertainty (1 sigma)."""
    return 0.0, 1.0


# 1. the sample file: every target key, the current version and its checksum
_, entry = call("GET", f"/api/challenges/{CHALLENGE}/sample-entry.json")
entry["label"] = "My method, first run"
entry["method"] = {"family": "tensor-network", "description": "MPS with TEBD", "settings": {"bondDimension": 256}}
for e in entry["estimates"]:
    e["value"], e["uncertainty"] = estimate(e["target"])
    e["uncertaintyKind"] = "systematic"

# 2. the dry run: every problem at once, a preview of the scores; nothing is stored
_, check = call("POST", "/api/entries/validate", entry)
print(f"valid: {check['estimates']} estimates, {len(check['warnings'])} warning(s)")

# 3. store the draft; a retry with the same Idempotency-Key returns the same entry
key = str(uuid.uuid4())
status, draft = call("POST", f"/api/challenges/{CHALLENGE}/entries", entry, {"Idempotency-Key": key})
print(f"draft {draft['id']} ({'created' if status == 201 else 'already there'})")

# 4. send it to review
_, sent = call("POST", f"/api/entries/{draft['id']}/submit")
print(f"entry {sent['id']} is {sent['state']}: {BASE}/entries/{sent['id']}")
`;

export const curlExamples = (base: string, slug: string) => `KEY=plx_...   # the team's API key
# the sample file (every target, the current version and checksum), filled in by you
curl -s -o my-entry.json ${base}/api/challenges/${slug}/sample-entry.json
# the dry run: every problem with its JSON pointer; nothing stored
curl -s -H 'content-type: application/json' --data-binary @my-entry.json ${base}/api/entries/validate
# store the draft (a retry with the same Idempotency-Key returns the same entry), then submit it
curl -s -H "x-api-key: $KEY" -H 'content-type: application/json' -H "Idempotency-Key: $(uuidgen)" \\
     --data-binary @my-entry.json ${base}/api/challenges/${slug}/entries
curl -s -X POST -H "x-api-key: $KEY" ${base}/api/entries/<id>/submit`;
