// tally's results page. It draws, per experiment, the error-rate plot (SVG built here), the
// crossings, the what-changed lines and the points table, from the data the watcher sends
// (server-sent events on /events) or, in a snapshot, from the JSON embedded in the page.
// Plain script, no library, no build step.
(function () {
  "use strict";

  var S = {
    exps: new Map(),   // id -> experiment view (as the server sends it)
    tap: new Map(),    // id -> tap shown in the plot
    full: new Set(),   // ids to redraw fully
    bars: new Set(),   // ids whose progress bar changed
    fresh: new Set(),  // ids whose run just started
    cards: new Map(),  // id -> its section element
    userTable: new Set(), // ids whose table the reader opened or folded
    hover: new Map(),  // id -> hover records of the points drawn, by index
    queued: false,
    snapshot: 0,
    stream: null,
  };
  var COLOURS = ["#1f5fa8", "#c2571a", "#2e8b57", "#8e3b9e", "#b8860b", "#2b8a9e", "#a83257", "#5a6270"];
  var main = document.getElementById("exps");
  var nav = document.getElementById("index");
  var tip = document.getElementById("tip");

  // ---- numbers and words ----

  // num reads a number the server sent: non-finite values come as "NaN", "Infinity", "-Infinity".
  function num(v) { return typeof v === "string" ? Number(v) : (v == null ? NaN : v); }
  function esc(s) {
    return String(s).replace(/[&<>"']/g, function (c) {
      return { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" }[c];
    });
  }
  function rate(x) {
    x = num(x);
    if (!isFinite(x)) return "–";
    if (x === 0) return "0";
    if (Math.abs(x) >= 0.1) return String(+x.toPrecision(3));
    return x.toExponential(2).replace(/\.?0+e/, "e").replace("e+", "e");
  }
  function si(x) {
    x = num(x);
    var units = [[1e12, "T"], [1e9, "G"], [1e6, "M"], [1e3, "k"]];
    for (var i = 0; i < units.length; i++) {
      if (Math.abs(x) >= units[i][0]) return +(x / units[i][0]).toPrecision(3) + units[i][1];
    }
    return String(+x.toPrecision(3));
  }
  function seconds(s) {
    s = num(s);
    if (!isFinite(s) || s < 0) return "–";
    if (s < 1) return Math.round(s * 1000) + " ms";
    if (s < 10) return s.toFixed(1) + " s";
    if (s < 120) return Math.round(s) + " s";
    if (s < 7200) return Math.floor(s / 60) + " min " + Math.floor(s % 60) + " s";
    return Math.floor(s / 3600) + " h " + Math.floor((s % 3600) / 60) + " min";
  }
  function fixed(x, d) {
    x = num(x);
    if (!isFinite(x)) return "–";
    var t = x.toFixed(d);
    return /^-0\.?0*$/.test(t) ? t.slice(1) : t;
  }
  function clock(ms) {
    var d = new Date(ms);
    return d.toLocaleTimeString([], { hour: "2-digit", minute: "2-digit", second: "2-digit" });
  }
  function pow10(k) {
    var sup = { "-": "⁻", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };
    if (k === 0) return "1";
    return "10" + String(k).split("").map(function (c) { return sup[c]; }).join("");
  }

  // ---- the run's data ----

  function valueText(run, p, i) {
    var labels = run.labels && run.labels[i];
    if (labels) { var k = Math.round(num(p.values[i])); if (k >= 0 && k < labels.length) return labels[k]; }
    return String(+num(p.values[i]).toPrecision(6));
  }
  function pointLabel(run, p) {
    return run.params.map(function (n, i) { return n + "=" + valueText(run, p, i); }).join(" ");
  }
  function tapOf(p, name) {
    var ts = p.taps || [];
    for (var i = 0; i < ts.length; i++) if (ts[i].name === name && !ts[i].absent) return ts[i];
    return null;
  }
  // curves splits a run's points into the curves along the x axis: one per value of the other
  // swept parameters, in the order they first appear.
  function curves(run) {
    var byKey = new Map(), out = [];
    (run.points || []).forEach(function (p, idx) {
      var key = p.values.slice(1).join("\u0000");
      var c = byKey.get(key);
      if (!c) {
        var lab = run.params.slice(1).map(function (n, i) { return n + "=" + valueText(run, p, i + 1); }).join(" ");
        c = { label: lab, points: [] };
        byKey.set(key, c);
        out.push(c);
      }
      c.points.push({ p: p, idx: idx });
    });
    return out;
  }
  function governing(run) {
    // The tap the script's rules and targets judge (run.json's "shown", first), else the BER.
    var s = (run.shown || []).filter(function (t) { return run.taps.indexOf(t) >= 0; });
    if (s.length) return s[0];
    return run.taps.indexOf("ber") >= 0 ? "ber" : run.taps[0];
  }
  function shown(v) {
    // The run drawn in full, and a run drawn faded behind it (the last good one, while a new
    // run fills in).
    if (v.status === "running") {
      if (v.live && v.live.points && v.live.points.length) return { run: v.live, ghost: v.good, live: true };
      return { run: null, ghost: v.good, live: true };
    }
    return { run: v.good, ghost: null, live: false };
  }

  // ---- the plot ----

  var W = 660, H = 390, M = { l: 58, r: 14, t: 16, b: 42 };

  function plot(v, tap) {
    var sh = shown(v), run = sh.run || sh.ghost;
    if (!run) return '<div class="empty">' + (v.status === "running" ? "the first point is on its way…" : "no results yet") + "</div>";
    var runs = [];
    if (sh.ghost && sh.run) runs.push({ run: sh.ghost, ghost: true });
    runs.push({ run: run, ghost: !sh.run });
    var xs = [], ys = [];
    var xlabels = run.labels && run.labels[0];
    runs.forEach(function (r) {
      (r.run.points || []).forEach(function (p) {
        var t = tapOf(p, tap);
        xs.push(num(p.values[0]));
        if (!t || !(t.trials > 0)) return;
        [num(t.rate), num(t.ci_low), num(t.ci_high)].forEach(function (y) { if (y > 0 && isFinite(y)) ys.push(y); });
        if (tap === "ber") (p.theory || []).forEach(function (y) { y = num(y); if (y > 0 && isFinite(y)) ys.push(y); });
      });
      (r.run.targets || []).forEach(function (t) { if (t.tap === tap) ys.push(num(t.target)); });
    });
    xs = xs.filter(isFinite);
    if (!xs.length) return '<div class="empty">no point counted anything yet</div>';
    var x0 = Math.min.apply(null, xs), x1 = Math.max.apply(null, xs);
    if (x0 === x1) { x0 -= 1; x1 += 1; }
    var pad = (x1 - x0) * 0.04; x0 -= pad; x1 += pad;
    var lo = -6, hi = 0;
    if (ys.length) {
      lo = Math.floor(Math.log10(Math.min.apply(null, ys)));
      hi = Math.ceil(Math.log10(Math.max.apply(null, ys)));
    }
    lo = Math.max(lo, -18); hi = Math.min(Math.max(hi, lo + 1), 0);
    if (hi <= lo) lo = hi - 1;
    var pw = W - M.l - M.r, ph = H - M.t - M.b;
    function X(x) { return M.l + (x - x0) / (x1 - x0) * pw; }
    function Y(y) {
      var ly = y > 0 ? Math.log10(y) : lo - 1;
      ly = Math.max(lo - 0.04, Math.min(hi, ly));
      return M.t + (hi - ly) / (hi - lo) * ph;
    }
    // Ytheory does not pin values to the frame: a theory curve runs on below the measured
    // points and is cut at the frame's edge (clip path).
    function Ytheory(y) { return M.t + (hi - Math.log10(y)) / (hi - lo) * ph; }
    var s = [];
    s.push('<svg viewBox="0 0 ' + W + " " + H + '" role="img" aria-label="' + esc(tap.toUpperCase()) + ' against ' + esc(run.params[0]) + '">');
    s.push('<clipPath id="frame-' + esc(v.id) + '"><rect x="' + M.l + '" y="' + M.t + '" width="' + pw + '" height="' + ph + '"/></clipPath>');
    // grid and axes
    for (var k = lo; k <= hi; k++) {
      s.push('<line class="grid major" x1="' + M.l + '" x2="' + (W - M.r) + '" y1="' + Y(Math.pow(10, k)) + '" y2="' + Y(Math.pow(10, k)) + '"/>');
      s.push('<text x="' + (M.l - 6) + '" y="' + (Y(Math.pow(10, k)) + 4) + '" text-anchor="end">' + pow10(k) + "</text>");
      if (k < hi && hi - lo <= 8) for (var m = 2; m < 10; m++) {
        var yy = Y(m * Math.pow(10, k));
        s.push('<line class="grid" x1="' + M.l + '" x2="' + (W - M.r) + '" y1="' + yy + '" y2="' + yy + '"/>');
      }
    }
    var ticks = [];
    if (xlabels) {
      for (var i = 0; i < xlabels.length; i++) if (i >= x0 && i <= x1) ticks.push([i, xlabels[i]]);
    } else {
      var step = niceStep((x1 - x0) / 8);
      for (var t = Math.ceil(x0 / step) * step; t <= x1 + 1e-9; t += step) ticks.push([t, String(+t.toPrecision(6))]);
    }
    ticks.forEach(function (tk) {
      var x = X(tk[0]);
      s.push('<line class="grid" x1="' + x + '" x2="' + x + '" y1="' + M.t + '" y2="' + (H - M.b) + '"/>');
      s.push('<text x="' + x + '" y="' + (H - M.b + 15) + '" text-anchor="middle">' + esc(tk[1]) + "</text>");
    });
    s.push('<path class="axis" d="M' + M.l + " " + M.t + "V" + (H - M.b) + "H" + (W - M.r) + '"/>');
    s.push('<text class="title" x="' + (M.l + pw / 2) + '" y="' + (H - 6) + '" text-anchor="middle">' + esc(axisName(run.params[0])) + "</text>");
    s.push('<text class="title" transform="translate(14 ' + (M.t + ph / 2) + ') rotate(-90)" text-anchor="middle">' + esc(tapName(tap)) + "</text>");
    // target lines and crossings
    var seenRate = {};
    (run.targets || []).forEach(function (t) {
      if (t.tap !== tap) return;
      var r = num(t.target), y = Y(r);
      if (!seenRate[r]) {
        seenRate[r] = true;
        s.push('<line class="target" x1="' + M.l + '" x2="' + (W - M.r) + '" y1="' + y + '" y2="' + y + '"/>');
        s.push('<text class="targettext" x="' + (W - M.r - 4) + '" y="' + (y - 5) + '" text-anchor="end">target ' + rate(r) + "</text>");
      }
      if (t.found) {
        var a = X(Math.max(x0, num(t.x_low))), b = X(Math.min(x1, num(t.x_high))), c = X(num(t.x));
        s.push('<line class="cross" x1="' + a + '" x2="' + b + '" y1="' + y + '" y2="' + y + '"/>');
        s.push('<path class="cross" fill="#fffdf8" d="M' + c + " " + (y - 6) + "l6 6l-6 6l-6 -6z" + '"/>');
      }
    });
    // the runs: faded ghost first, then the run itself
    var legend = [], hov = [], drawn = 0;
    S.hover.set(v.id, hov);
    runs.forEach(function (r) {
      var cs = curves(r.run);
      s.push(r.ghost ? '<g class="ghost">' : "<g>");
      cs.forEach(function (c, ci) {
        var col = COLOURS[ci % COLOURS.length];
        if (!r.ghost) legend.push({ label: c.label || r.run.name || "measured", colour: col });
        // theory, dashed
        if (tap === "ber") (r.run.theory || []).forEach(function (name, ti) {
          var d = "";
          c.points.forEach(function (q) {
            var y = num((q.p.theory || [])[ti]);
            if (y > 0 && isFinite(y)) d += (d ? "L" : "M") + X(num(q.p.values[0])).toFixed(1) + " " + Ytheory(y).toFixed(1);
          });
          if (d) s.push('<path clip-path="url(#frame-' + esc(v.id) + ')" d="' + d + '" fill="none" stroke="' + col + '" stroke-width="1.2" stroke-dasharray="' + (ti ? "2 3" : "7 4") + '" opacity=".8"/>');
          if (d && !r.ghost && ci === 0) legend.push({ label: name === "theory" ? "theory" : "theory: " + name, colour: "#5d6470", dash: ti ? "2 3" : "7 4" });
        });
        // measured: line through the estimates, interval bars, markers
        var d = "";
        c.points.forEach(function (q) {
          var t = tapOf(q.p, tap);
          if (t && t.trials > 0 && num(t.errors) > 0) d += (d ? "L" : "M") + X(num(q.p.values[0])).toFixed(1) + " " + Y(num(t.rate)).toFixed(1);
        });
        if (d) s.push('<path d="' + d + '" fill="none" stroke="' + col + '" stroke-width="1.6"/>');
        // One path each for the bars, the dots and the open triangles of a curve, however
        // many points: the page stays light with thousands of them. Hovering finds the
        // nearest point (see the mousemove handler).
        var bars = "", dots = "", tris = "";
        c.points.forEach(function (q) {
          var t = tapOf(q.p, tap);
          if (!t || !(t.trials > 0)) return;
          var x = +X(num(q.p.values[0])).toFixed(1), lo_ = +Y(num(t.ci_low)).toFixed(1), hi_ = +Y(num(t.ci_high)).toFixed(1);
          bars += "M" + x + " " + lo_ + "V" + hi_ + "M" + (x - 3) + " " + lo_ + "h6M" + (x - 3) + " " + hi_ + "h6";
          var y;
          if (num(t.errors) === 0) {
            // no error: drawn at its upper bound, an open triangle pointing down
            y = hi_;
            tris += "M" + (x - 5) + " " + (y - 4) + "h10l-5 8z";
          } else {
            y = +Y(num(t.rate)).toFixed(1);
            dots += "M" + (x - 3.6) + " " + y + "a3.6 3.6 0 1 0 7.2 0a3.6 3.6 0 1 0 -7.2 0";
          }
          if (!r.ghost) { hov.push({ run: r.run, p: q.p, tap: tap, x: x, y: y, colour: col }); drawn++; }
        });
        if (bars) s.push('<path d="' + bars + '" stroke="' + col + '" stroke-width="1" fill="none"/>');
        if (dots) s.push('<path class="dots" d="' + dots + '" fill="' + col + '" stroke="#fffdf8" stroke-width="1"/>');
        if (tris) s.push('<path class="tris" d="' + tris + '" fill="#fffdf8" stroke="' + col + '" stroke-width="1.4"/>');
      });
      s.push("</g>");
    });
    s.push('<circle class="ring" r="7" cx="-20" cy="-20"/>');
    s.push("</svg>");
    s[0] = s[0].replace("<svg ", '<svg data-n="' + drawn + '" ');
    var lg = legend.map(function (l) {
      var sw = l.dash ? '<svg width="22" height="8"><line x1="0" x2="22" y1="4" y2="4" stroke="' + l.colour + '" stroke-width="1.4" stroke-dasharray="' + l.dash + '"/></svg>'
        : '<svg width="22" height="8"><line x1="0" x2="22" y1="4" y2="4" stroke="' + l.colour + '" stroke-width="1.6"/><circle cx="11" cy="4" r="3" fill="' + l.colour + '"/></svg>';
      return '<span class="key">' + sw + " " + esc(l.label) + "</span>";
    });
    if (sh.ghost && sh.run) lg.push('<span class="key muted">faded: the run before this one</span>');
    else if (!sh.run && sh.ghost) lg.push('<span class="key muted">faded: the last good run</span>');
    return s.join("") + '<div class="legend">' + lg.join(" ") + "</div>";
  }
  function niceStep(raw) {
    var p = Math.pow(10, Math.floor(Math.log10(raw))), f = raw / p;
    return (f <= 1 ? 1 : f <= 2 ? 2 : f <= 2.5 ? 2.5 : f <= 5 ? 5 : 10) * p;
  }
  function axisName(p) {
    var names = { ebn0_db: "Eb/N0 (dB)", esn0_db: "Es/N0 (dB)", snr_db: "SNR (dB)" };
    return names[p] || p.replace(/_db$/, " (dB)");
  }
  function tapName(t) {
    var names = { ber: "bit error rate", fer: "frame error rate", pre_ber: "BER before the decoder" };
    return names[t] || t;
  }

  // ---- the side: crossings and what changed ----

  function crossings(v) {
    var sh = shown(v), run = sh.run && sh.live ? null : (sh.run || sh.ghost);
    if (!run || !run.targets || !run.targets.length) return '<p class="muted">' + (sh.live ? "found when the run ends" : "no target set (x.Target)") + "</p>";
    var unit = /_db$/i.test(run.params[0]) ? " dB" : "";
    return '<ul class="crossings">' + run.targets.map(function (t) {
      var head = t.tap.toUpperCase() + " " + rate(t.target) + (t.curve ? " · " + t.curve : "");
      if (!t.found) return "<li>" + esc(head) + ': <span class="rest">not reached inside the sweep' + (t.note ? " — " + esc(t.note) : "") + "</span></li>";
      var rest = [];
      rest.push("interval " + fixed(t.x_low, 2) + " to " + fixed(t.x_high, 2));
      if (t.against) rest.push(fixed(t.penalty_db, 2) + " dB from " + t.against + (t.theory_x ? " (theory " + fixed(t.theory_x, 2) + ")" : ""));
      if (t.gain_over) rest.push(fixed(t.gain_db, 2) + " dB less than " + t.gain_over);
      if (t.note) rest.push(t.note);
      return "<li>" + esc(head) + ' at <span class="x">' + esc(run.params[0]) + " = " + fixed(t.x, 2) + unit + '</span><div class="rest">' + esc(rest.join(" · ")) + "</div></li>";
    }).join("") + "</ul>";
  }
  function changes(v) {
    if (!v.changes || !v.changes.length) return '<p class="muted">' + (v.good ? "nothing to compare with yet" : "no run yet") + "</p>";
    var moved = v.changes.filter(function (l) { return /CHANGED, p [=<]/.test(l); }).length;
    var tested = v.changes.filter(function (l) { return /CHANGED, p [=<]|within chance, p [=<]/.test(l); }).length;
    var head = tested ? '<p class="verdict' + (moved ? " moved" : "") + '">' + (moved ? moved + " of " + tested + " compared points moved beyond chance" : "no point moved beyond chance (" + tested + " compared)") + "</p>" : "";
    return head + '<pre class="changes">' + v.changes.map(function (l) {
      var e = esc(l);
      if (/CHANGED, p [=<]/.test(l)) return '<span class="moved">' + e + "</span>";
      if (/within chance/.test(l)) return '<span class="chance">' + e + "</span>";
      return e;
    }).join("\n") + "</pre>";
  }

  // ---- the table ----

  function table(v) {
    var sh = shown(v), run = sh.run || sh.ghost;
    if (!run || !run.points || !run.points.length) return '<p class="muted">no points yet</p>';
    var main_ = governing(run);
    var others = run.taps.filter(function (t) { return t !== main_; });
    var conf = Math.round(num(run.confidence) * 100);
    var h = ['<div class="tablewrap"><table><thead><tr>'];
    run.params.forEach(function (p) { h.push('<th class="p">' + esc(p) + "</th>"); });
    h.push("<th>" + (main_ === "ber" || main_ === "pre" ? "bits" : main_ === "fer" ? "frames" : "trials") + "</th><th>errors</th><th>" + esc(main_.toUpperCase()) + "</th><th>" + conf + " % interval</th>");
    others.forEach(function (t) { h.push("<th>" + esc(t.toUpperCase()) + "</th>"); });
    (run.theory || []).forEach(function (t) { h.push("<th>theory " + esc(t) + "</th>"); });
    h.push('<th class="p">stop</th><th>time</th></tr></thead><tbody>');
    var last = sh.live && sh.run ? run.points.length - 1 : -1;
    run.points.forEach(function (p, i) {
      var t = tapOf(p, main_) || { trials: 0, errors: 0, rate: NaN, ci_low: NaN, ci_high: NaN };
      var cls = p.stop === "skipped" ? "skip" : i === last ? "new" : "";
      h.push("<tr" + (cls ? ' class="' + cls + '"' : "") + ">");
      run.params.forEach(function (n, k) { h.push('<td class="p">' + esc(valueText(run, p, k)) + "</td>"); });
      if (p.stop === "skipped") {
        // Nothing was counted: empty cells, not a measured 0 of 0 with the interval [0, 1].
        h.push("<td></td><td></td><td></td><td></td>");
        others.forEach(function () { h.push("<td></td>"); });
      } else {
        h.push("<td>" + si(t.trials) + "</td><td>" + t.errors + "</td><td>" + rate(t.rate) + "</td><td>" + rate(t.ci_low) + " – " + rate(t.ci_high) + "</td>");
        others.forEach(function (n) {
          var o = tapOf(p, n);
          h.push(o ? '<td title="' + o.errors + " of " + o.trials + '">' + rate(o.rate) + "</td>" : "<td>–</td>");
        });
      }
      (run.theory || []).forEach(function (n, k) { h.push("<td>" + rate((p.theory || [])[k]) + "</td>"); });
      h.push('<td class="stop">' + esc(p.stop || "") + (p.note ? " · " + esc(p.note) : "") + "</td><td>" + seconds(p.wall_seconds) + "</td></tr>");
    });
    h.push("</tbody></table></div>");
    return h.join("");
  }

  // ---- one experiment ----

  function card(v) {
    var el = S.cards.get(v.id);
    if (el) return el;
    el = document.createElement("section");
    S.cards.set(v.id, el);
    el.className = "exp";
    el.id = "exp-" + v.id;
    el.innerHTML = '<div class="head"><h2></h2><span class="pill"></span><div class="meta"></div></div>' +
      '<div class="fault" hidden></div><div class="bars"></div>' +
      '<div class="stalebox"><div class="stalemark"></div><div class="body"><div><div class="taps"></div><div class="plot"></div></div>' +
      "<aside><h3>Crossings at the target</h3><div class=\"crossbox\"></div><div class=\"since\"><h3>Since the run before</h3><div class=\"changed\"></div></div></aside></div></div>" +
      '<details class="points" open><summary>Points</summary><div class="table"></div></details>';
    return el;
  }

  function statusText(v) {
    switch (v.status) {
      case "running":
        var n = v.live && v.live.points ? v.live.points.length : 0;
        return "running" + (v.total ? " · " + n + " of " + v.total + " points" : " · started " + clock(v.since));
      case "finished": return "finished" + (v.took ? " in " + seconds(v.took) : "");
      case "failed": return v.error && v.error.pos ? "script error" : "run failed";
      case "cancelled": return "stopped by a newer save";
      default: return "waiting to run";
    }
  }

  function draw(v) {
    var el = card(v);
    var sh = shown(v), run = sh.run || sh.ghost;
    el.dataset.status = v.status;
    el.dataset.seq = v.seq;
    el.dataset.points = sh.run && sh.run.points ? sh.run.points.length : 0;
    el.querySelector("h2").textContent = run && run.name ? run.name : v.file;
    var pill = el.querySelector(".pill");
    pill.dataset.status = v.status;
    pill.textContent = statusText(v) + (v.seq > 1 ? " · run " + v.seq : "");
    var meta = [];
    meta.push("<code>" + esc(v.file) + "</code>");
    if (run) {
      meta.push("seed " + esc(run.seed) + " · " + esc(run.mode) + " · " + esc(run.workers) + " workers");
      meta.push(esc(run.interval_method) + " intervals at " + Math.round(num(run.confidence) * 100) + " %");
      if (run.end && !sh.live) meta.push("ended " + esc(new Date(run.end).toLocaleString()));
    }
    if (v.files && v.files.length && !S.snapshot) {
      meta.push(v.files.map(function (f) { return '<a href="files/' + encodeURIComponent(v.id) + "/" + encodeURIComponent(f) + '">' + esc(f) + "</a>"; }).join(" "));
    }
    el.querySelector(".meta").innerHTML = meta.map(function (m) { return "<span>" + m + "</span>"; }).join("");
    // the error, with the last good results beneath it marked stale
    var fault = el.querySelector(".fault");
    var stale = !!(v.error && v.good);
    if (v.error) {
      fault.hidden = false;
      fault.innerHTML = (v.error.pos ? '<span class="where">' + esc(v.error.pos) + "</span> " : "") +
        '<span class="msg">' + esc(v.error.msg) + "</span>" +
        '<div class="after">' + (v.status === "running" ? "A new run is on its way. " : "Fix the script and save: it runs again. ") +
        (v.good ? "The results below are the last good ones, from before this change." : "There are no earlier results.") + "</div>";
    } else {
      fault.hidden = true;
      fault.textContent = "";
    }
    var box = el.querySelector(".stalebox");
    box.classList.toggle("stale", stale);
    el.dataset.stale = stale ? "yes" : "no";
    el.querySelector(".stalemark").textContent = stale ? "stale: these results come from the last good run, " + (v.good && v.good.end ? "ended " + new Date(v.good.end).toLocaleString() : "before the script changed") : "";
    // the tap chooser and the plot
    var taps = run ? run.taps || [] : [];
    var tap = S.tap.get(v.id);
    if (!tap || taps.indexOf(tap) < 0) tap = run ? governing(run) : taps.indexOf("ber") >= 0 ? "ber" : taps[0] || "ber";
    el.querySelector(".taps").innerHTML = taps.length > 1 ? taps.map(function (t) {
      return '<button type="button" data-tap="' + esc(t) + '" aria-pressed="' + (t === tap) + '">' + esc(t.toUpperCase()) + "</button>";
    }).join("") : "";
    el.querySelector(".plot").innerHTML = plot(v, tap);
    el.querySelector(".crossbox").innerHTML = crossings(v);
    el.querySelector(".changed").innerHTML = changes(v);
    el.querySelector(".since").hidden = !!S.snapshot && !(v.changes && v.changes.length);
    // The table of a long sweep starts folded (and is then not built), until it is opened.
    var tb = el.querySelector(".table"), det = el.querySelector(".points");
    var pts = run && run.points ? run.points.length : 0;
    if (!S.userTable.has(v.id)) det.open = pts <= 40;
    tb.innerHTML = det.open ? table(v) : "";
    el.querySelector(".points summary").textContent = "Points (" + pts + ")";
    drawBar(v, el);
  }

  function drawBar(v, el) {
    var bars = el.querySelector(".bars");
    var l = v.progress;
    if (v.status !== "running") { bars.innerHTML = ""; return; }
    if (!l) {
      var n = v.live && v.live.points ? v.live.points.length : 0;
      bars.innerHTML = '<p class="note">' + (n ? "point " + (n + 1) + (v.total ? " of " + v.total : "") + " starting…" : "run " + v.seq + " started at " + clock(v.since) + " after a save; the first point is running…") + "</p>";
      return;
    }
    if (!(num(l.bits) > 0)) {
      // told as the point starts, before its first frame is in
      bars.innerHTML = '<p class="note">[' + (l.index + 1) + "/" + l.total + "] " + esc(l.label) + " · starting…</p>";
      return;
    }
    var f = 0;
    if (l.goal > 0) f = Math.max(f, l.errors / l.goal);
    if (l.cap > 0) f = Math.max(f, l.bits / l.cap);
    f = Math.min(1, f);
    var words = "[" + (l.index + 1) + "/" + l.total + "] " + l.label +
      " · " + (l.tap && l.tap !== "ber" ? l.tap + " " : "") + "errors " + l.errors + (l.goal ? "/" + l.goal : "") +
      " · bits " + si(l.bits) + (l.cap ? "/" + si(l.cap) : "") +
      (isFinite(num(l.ber)) ? " · " + (l.tap || "ber") + " " + rate(l.ber) : "") +
      " · " + (num(l.rate) / 1e6).toFixed(1) + " Mbit/s" +
      (num(l.left) >= 0 ? " · ~" + seconds(l.left) + " left" : "");
    var bar = bars.querySelector(".bar");
    if (!bar) {
      bars.innerHTML = '<div class="bar"><div class="track"><div class="fill"></div></div><div class="words"></div></div>';
      bar = bars.querySelector(".bar");
    }
    bar.querySelector(".fill").style.width = (f * 100).toFixed(1) + "%";
    bar.querySelector(".words").textContent = words;
  }

  // ---- the index in the header ----

  function drawIndex() {
    var ids = order();
    nav.innerHTML = ids.map(function (id) {
      var v = S.exps.get(id), run = v.good || v.live;
      var name = v.file.split(/[\\/]/).pop().replace(/\.go$/, "");
      return '<a href="#exp-' + esc(id) + '" data-status="' + esc(v.status) + '" title="' + esc((run && run.name) || v.file) + " · " + esc(statusText(v)) + '"><i></i>' + esc(name) + "</a>";
    }).join("");
  }
  function order() {
    return Array.from(S.exps.keys()).sort(function (a, b) {
      var x = S.exps.get(a).file, y = S.exps.get(b).file;
      return x < y ? -1 : x > y ? 1 : 0;
    });
  }

  // ---- applying the server's messages ----

  function schedule() {
    if (S.queued) return;
    S.queued = true;
    requestAnimationFrame(flush);
  }
  function flush() {
    var began = performance.now();
    S.queued = false;
    var ids = order();
    var nothing = main.querySelector(".nothing");
    if (ids.length && nothing) nothing.remove();
    if (!ids.length && !nothing) main.innerHTML = '<p class="nothing">No experiment watched.</p>';
    // keep the cards in file order
    var prev = null;
    ids.forEach(function (id) {
      var v = S.exps.get(id);
      var el = card(v);
      if (S.full.has(id) || !el.parentNode) draw(v);
      else if (S.bars.has(id)) drawBar(v, el);
      if (S.fresh.has(id)) { el.classList.remove("fresh"); void el.offsetWidth; el.classList.add("fresh"); }
      var want = prev ? prev.nextSibling : main.firstChild;
      if (want !== el) main.insertBefore(el, want);
      prev = el;
    });
    Array.prototype.slice.call(main.querySelectorAll("section.exp")).forEach(function (el) {
      if (!S.exps.has(el.id.slice(4))) { el.remove(); S.cards.delete(el.id.slice(4)); }
    });
    if (S.full.size || S.fresh.size) drawIndex();
    S.full.clear(); S.bars.clear(); S.fresh.clear();
    S.flushMs = performance.now() - began;
  }
  function setState(d) {
    S.exps = new Map();
    S.hover = new Map();
    (d.exps || []).forEach(function (v) { S.exps.set(v.id, v); S.full.add(v.id); });
    main.querySelectorAll("section.exp").forEach(function (el) { el.remove(); });
    S.cards = new Map();
    schedule();
  }
  function upsert(v) {
    if (v.removed) { S.exps.delete(v.id); S.full.add(v.id); schedule(); return; }
    var old = S.exps.get(v.id);
    if (v.status === "running" && (!old || old.seq !== v.seq)) S.fresh.add(v.id);
    S.exps.set(v.id, v);
    S.full.add(v.id);
    schedule();
  }
  function onPoint(m) {
    var v = S.exps.get(m.id);
    if (!v || v.seq !== m.seq || v.status !== "running") return;
    var pts = v.live && v.live.points ? v.live.points : [];
    v.live = Object.assign({}, m.head, { points: pts });
    if (pts.length < m.n) pts.push(m.point);
    v.total = m.total;
    v.progress = null;
    S.full.add(v.id);
    schedule();
  }
  function onProgress(m) {
    var v = S.exps.get(m.id);
    if (!v || v.seq !== m.seq || v.status !== "running") return;
    v.progress = m.live;
    S.bars.add(v.id);
    schedule();
  }
  function setConn(state, text) {
    var c = document.getElementById("conn");
    c.dataset.state = state;
    c.querySelector(".text").textContent = text || { live: "live", lost: "watcher gone · reconnecting…", connecting: "connecting…" }[state];
  }
  function connect() {
    var es = new EventSource("events");
    S.stream = es;
    es.addEventListener("state", function (e) { var t = performance.now(); setState(JSON.parse(e.data)); S.stateMs = performance.now() - t; S.stateAt = t; setConn("live"); });
    es.addEventListener("exp", function (e) { upsert(JSON.parse(e.data)); });
    es.addEventListener("point", function (e) { onPoint(JSON.parse(e.data)); });
    es.addEventListener("progress", function (e) { onProgress(JSON.parse(e.data)); });
    es.addEventListener("open", function () { setConn("live"); });
    es.addEventListener("error", function () {
      setConn("lost");
      // The browser retries by itself unless the stream failed for good; then start afresh.
      if (es.readyState === EventSource.CLOSED) {
        es.close();
        setTimeout(connect, 1000);
      }
    });
  }

  // ---- hovering a point ----

  function hoverText(h) {
    var run = h.run, p = h.p, t = tapOf(p, h.tap);
    var rows = ["<b>" + esc(pointLabel(run, p)) + "</b>"];
    if (t) {
      var conf = Math.round(num(run.confidence) * 100);
      rows.push('<span class="k">' + esc(h.tap) + "</span> " + rate(t.rate) + " · " + t.errors + " errors in " + si(t.trials) + (h.tap === "fer" ? " frames" : " bits"));
      rows.push('<span class="k">' + conf + " % interval</span> " + rate(t.ci_low) + " to " + rate(t.ci_high) + ' <span class="k">(' + esc(t.method) + ")</span>");
      if (num(t.dispersion) > 1) rows.push('<span class="k">errors bunched</span> dispersion ' + num(t.dispersion).toFixed(2));
    }
    rows.push('<span class="k">stopped by</span> ' + esc(p.stop || "–") + (p.note ? " · " + esc(p.note) : ""));
    (run.theory || []).forEach(function (name, k) {
      var y = num((p.theory || [])[k]);
      rows.push('<span class="k">theory ' + esc(name) + "</span> " + rate(y) + (t && y > 0 && t.errors > 0 ? " · measured/theory " + (num(t.rate) / y).toFixed(2) : ""));
    });
    rows.push('<span class="k">' + si(p.frames) + (p.frames === 1 ? " frame in " : " frames in ") + seconds(p.wall_seconds) + "</span>" + (num(p.bits_per_second) > 0 ? ' <span class="k">· ' + (num(p.bits_per_second) / 1e6).toFixed(1) + " Mbit/s</span>" : ""));
    return rows.join("<br>");
  }
  // Hovering a plot shows the nearest point within reach: its counts, interval, stop reason
  // and theory, and rings it.
  var ringed = null;
  main.addEventListener("mousemove", function (e) {
    var svg = e.target.closest && e.target.closest(".plot > svg");
    if (!svg) { unhover(); return; }
    var sec = svg.closest("section.exp");
    var list = S.hover.get(sec.id.slice(4)) || [];
    var m = svg.getScreenCTM();
    if (!m) return;
    var pt = new DOMPoint(e.clientX, e.clientY).matrixTransform(m.inverse());
    var best = null, bd = 14 * 14;
    for (var i = 0; i < list.length; i++) {
      var dx = list[i].x - pt.x, dy = list[i].y - pt.y, d = dx * dx + dy * dy;
      if (d < bd) { bd = d; best = list[i]; }
    }
    if (!best) { unhover(); return; }
    var ring = svg.querySelector(".ring");
    ring.setAttribute("cx", best.x);
    ring.setAttribute("cy", best.y);
    ring.setAttribute("stroke", best.colour);
    if (ringed && ringed !== ring) ringed.setAttribute("cx", -20);
    ringed = ring;
    tip.innerHTML = hoverText(best);
    tip.hidden = false;
    place(e);
  });
  main.addEventListener("mouseleave", unhover);
  function unhover() {
    if (ringed) { ringed.setAttribute("cx", -20); ringed = null; }
    tip.hidden = true;
  }
  function place(e) {
    var x = e.clientX + 14, y = e.clientY + 14;
    var r = tip.getBoundingClientRect();
    if (x + r.width > window.innerWidth - 8) x = e.clientX - r.width - 14;
    if (y + r.height > window.innerHeight - 8) y = e.clientY - r.height - 14;
    tip.style.left = x + "px";
    tip.style.top = y + "px";
  }
  main.addEventListener("toggle", function (e) {
    var det = e.target;
    if (!det.matches || !det.matches("details.points") || !det.open) return;
    var tb = det.querySelector(".table"), v = S.exps.get(det.closest("section.exp").id.slice(4));
    if (v && !tb.firstChild) tb.innerHTML = table(v);
  }, true);
  main.addEventListener("click", function (e) {
    var sum = e.target.closest && e.target.closest("details.points > summary");
    if (sum) S.userTable.add(sum.closest("section.exp").id.slice(4));
    var b = e.target.closest && e.target.closest("button[data-tap]");
    if (!b) return;
    var id = b.closest("section.exp").id.slice(4);
    S.tap.set(id, b.getAttribute("data-tap"));
    S.full.add(id);
    schedule();
  });

  // ---- start ----

  var snap = document.getElementById("snapshot");
  if (snap) {
    var d = JSON.parse(snap.textContent);
    S.snapshot = d.snapshot;
    setState(d);
    setConn("snapshot", "snapshot of " + new Date(d.snapshot).toLocaleString());
  } else {
    connect();
  }
  window.tallyPage = S; // for the tests and the curious
})();
