package preview

import (
	"crypto/sha256"
	"encoding/base64"
	"html"
)

// liveScript is the script of a served page (never of a built file). It
// reads the page's version and address from the calcdoc-live meta element
// and opens an EventSource on /_events?doc=ADDRESS&v=VERSION. On a
// "change" event to a version being evaluated it shows a banner saying so;
// on one to a new version it asks PatchPath for what changed since the
// page it shows and replaces only those elements (the rows of a calc
// block, the summary, ...), keeping the scroll position; when no patch can
// be had (a version missed, the head changed) it reloads the page, saving
// the scroll position in sessionStorage first and restoring it once the
// reloaded page has loaded. The server
// compares v with the document's current version as soon as the stream
// opens, so a save that happened between loading the page and opening the
// stream is not missed. The stream is open only while the page is visible
// (a browser allows few connections per host, and a hidden tab needs none);
// a page that becomes visible again catches up at once. When the stream
// cannot be reopened for two seconds, a notice says that the page may be
// out of date.
//
// The script is the same on every page, so that the Content-Security-Policy
// can allow it by its hash alone.
const liveScript = `(function () {
  "use strict";
  var meta = document.querySelector('meta[name="calcdoc-live"]');
  if (!meta || !window.EventSource) { return; }
  var version = meta.getAttribute("content");
  var doc = meta.getAttribute("data-doc");
  var key = "calcdoc-scroll " + doc;
  var saved = null;
  try { saved = window.sessionStorage.getItem(key); window.sessionStorage.removeItem(key); } catch (e) {}
  if (saved) {
    var xy = saved.split(" ");
    window.addEventListener("load", function () { window.scrollTo(Number(xy[0]), Number(xy[1])); });
  }
  var source = null, timer = null, notice = null;
  function reload() {
    try { window.sessionStorage.setItem(key, window.scrollX + " " + window.scrollY); } catch (e) {}
    window.location.reload();
  }
  var pending = null;
  function busy(on) {
    if (on && !pending && document.body) {
      pending = document.createElement("div");
      pending.className = "calcdoc-pending";
      pending.setAttribute("role", "status");
      pending.textContent = "A newer save of this document is being evaluated: this page shows the one before it, " +
        "and changes by itself when the new sheet is ready.";
      document.body.insertBefore(pending, document.body.firstChild);
    } else if (!on && pending) {
      pending.parentNode.removeChild(pending);
      pending = null;
    }
  }
  function patch(to) {
    if (to === version) { busy(false); return; }
    if (/-evaluating$/.test(to) && !/-evaluating$/.test(version)) { busy(true); return; }
    if (!window.fetch || /-evaluating$/.test(version)) { reload(); return; }
    window.fetch("/_patch?doc=" + encodeURIComponent(doc) + "&from=" + encodeURIComponent(version), { cache: "no-store" })
      .then(function (r) { if (!r.ok) { throw new Error("no patch"); } return r.json(); })
      .then(function (p) {
        p.ops.forEach(function (op) {
          var where = op["in"];
          var parent = where === "body" ? document.body : where === "main" ? document.querySelector("main.body") : document.getElementById(where.slice(1));
          if (!parent) { throw new Error("no " + where); }
          var kids = Array.prototype.filter.call(parent.children, function (e) { return e !== notice && e !== pending; });
          if (op.at + op.del > kids.length) { throw new Error("the page is not the one the patch is from"); }
          var before = kids[op.at + op.del] || null;
          for (var i = 0; i < op.del; i++) { parent.removeChild(kids[op.at + i]); }
          var range = document.createRange();
          range.selectNodeContents(parent);
          parent.insertBefore(range.createContextualFragment(op.html), before);
        });
        version = p.v;
        meta.setAttribute("content", version);
        busy(false);
      })
      ["catch"](reload);
  }
  function warn(on) {
    if (on && !notice && document.body) {
      notice = document.createElement("div");
      notice.className = "calcdoc-live-off";
      notice.setAttribute("role", "alert");
      notice.textContent = "Live preview disconnected: this page may not show the latest save. " +
        "It reloads by itself when calcdoc watch runs again.";
      document.body.insertBefore(notice, document.body.firstChild);
    } else if (!on && notice) {
      notice.parentNode.removeChild(notice);
      notice = null;
    }
  }
  function connect() {
    if (source) { return; }
    source = new EventSource("/_events?doc=" + encodeURIComponent(doc) + "&v=" + encodeURIComponent(version));
    source.addEventListener("change", function (e) { patch(e.data); });
    source.onopen = function () { window.clearTimeout(timer); timer = null; warn(false); };
    source.onerror = function () {
      if (!timer) { timer = window.setTimeout(function () { warn(true); }, 2000); }
      if (source && source.readyState === 2) {
        source.close();
        source = null;
        window.setTimeout(function () { if (!document.hidden) { connect(); } }, 2000);
      }
    };
  }
  function disconnect() {
    if (source) { source.close(); source = null; }
    window.clearTimeout(timer);
    timer = null;
  }
  document.addEventListener("visibilitychange", function () {
    if (document.hidden) { disconnect(); } else { connect(); }
  });
  if (!document.hidden) { connect(); }
})();`

// liveStyle styles the disconnection notice; it is never printed.
const liveStyle = `.calcdoc-live-off, .calcdoc-pending { position: sticky; top: 0; z-index: 9; background: #fff; border: 1.5pt solid #111;
  padding: 3pt 6pt; margin: 0 0 3mm; font-weight: bold; }
.calcdoc-pending { border-style: dashed; }
@media print { .calcdoc-live-off, .calcdoc-pending { display: none; } }`

// csp is the Content-Security-Policy of every page served: nothing from
// elsewhere, inline styles, the live script by its SHA-256 (CSP Level 3,
// hash-source) and no other script, connections only back to this server.
var csp = "default-src 'none'; script-src 'sha256-" + scriptHash(liveScript) + "'; " +
	"style-src 'unsafe-inline'; img-src 'self' data:; connect-src 'self'; " +
	"base-uri 'none'; form-action 'none'; frame-ancestors 'none'"

func scriptHash(s string) string {
	sum := sha256.Sum256([]byte(s))
	return base64.StdEncoding.EncodeToString(sum[:])
}

// liveHead is what a served page carries at the end of its head: the meta
// element naming its address and version, the notice's style and the
// script.
func liveHead(doc, version string) string {
	return "<meta name=\"calcdoc-live\" content=\"" + html.EscapeString(version) +
		"\" data-doc=\"" + html.EscapeString(doc) + "\">\n<style>\n" + liveStyle +
		"\n</style>\n<script>" + liveScript + "</script>\n"
}
