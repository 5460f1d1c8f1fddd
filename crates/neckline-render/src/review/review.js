// neckline review page: the forming-limit diagram and the part map, linked, drawn on canvas.
// Hand-written, no library, nothing fetched. The data (zone code, line styles, locations,
// density cells) comes from the JSON element #neckline-data written by neckline.
(function () {
  "use strict";
  var D = JSON.parse(document.getElementById("neckline-data").textContent);
  var COMPARE = D.kind === "compare";

  // ---- decoding -------------------------------------------------------------------------
  function bytes(b64) {
    var s = atob(b64), n = s.length, u = new Uint8Array(n);
    for (var i = 0; i < n; i++) u[i] = s.charCodeAt(i);
    return u;
  }
  function f32(b64) { return b64 == null ? null : new Float32Array(bytes(b64).buffer); }
  function i32(b64) { return b64 == null ? null : new Int32Array(bytes(b64).buffer); }
  function u8(b64) { return b64 == null ? null : bytes(b64); }

  var P = D.pts, N = P.n;
  var ids = N ? P.ids.split("\n") : [];
  var zone = u8(P.zone), dx = f32(P.dx), dy = f32(P.dy), mx = f32(P.mx), my = f32(P.my);
  var major = f32(P.major), minor = f32(P.minor), margin = f32(P.margin);
  var reason = i32(P.reason);
  var border = COMPARE ? null : u8(P.border), thin = COMPARE ? null : f32(P.thin);
  var use = COMPARE ? null : f32(P.use), mc = COMPARE ? null : u8(P.mc);
  var change = COMPARE ? u8(P.change) : null, zoneBefore = COMPARE ? u8(P.zoneBefore) : null;
  var fx = COMPARE ? f32(P.fx) : null, fy = COMPARE ? f32(P.fy) : null;
  var mfx = COMPARE ? f32(P.mfx) : null, mfy = COMPARE ? f32(P.mfy) : null;
  var marginBefore = COMPARE ? f32(P.marginBefore) : null, dmargin = COMPARE ? f32(P.dmargin) : null;
  var ZONES = D.zones, ZN = ZONES.map(function (z) { return z.name; });
  var CHANGES = ["improved", "worsened", "unchanged", "new", "gone"];
  var byId = {};
  for (var k = 0; k < N; k++) if (!(ids[k] in byId)) byId[ids[k]] = k;

  // ---- state ----------------------------------------------------------------------------
  var shown = ZN.map(function () { return true; });
  var shownChange = CHANGES.map(function () { return true; });
  var selected = new Set();
  var current = -1, hover = -1, mode = "select";
  var drawnLog = { fld: null, map: null };
  var sortKey = null, sortDir = 1;

  function visible(i) {
    return shown[zone[i]] && (!COMPARE || shownChange[change[i]]);
  }
  function fmt(v, d) {
    if (v == null || isNaN(v)) return "—";
    var t = v.toFixed(d == null ? 1 : d);
    return t === "-0.0" ? "0.0" : t.replace("-", "−");
  }
  function el(tag, attrs, kids) {
    var e = document.createElement(tag);
    if (attrs) for (var a in attrs) {
      if (a === "text") e.textContent = attrs[a];
      else if (a.slice(0, 2) === "on") e.addEventListener(a.slice(2), attrs[a]);
      else e.setAttribute(a, attrs[a]);
    }
    (kids || []).forEach(function (c) { if (c) e.appendChild(typeof c === "string" ? document.createTextNode(c) : c); });
    return e;
  }

  // ---- markers: the shapes of plot::marker ------------------------------------------------
  function marker(ctx, shape, x, y, r, fill, edge) {
    ctx.lineWidth = 1;
    ctx.strokeStyle = edge;
    ctx.fillStyle = fill;
    ctx.beginPath();
    switch (shape) {
      case "barred":
        ctx.arc(x, y, r + 1, 0, 2 * Math.PI); ctx.fill(); ctx.stroke();
        var kk = Math.round(r * 0.7);
        ctx.beginPath(); ctx.moveTo(x - kk, y - kk); ctx.lineTo(x + kk, y + kk);
        ctx.strokeStyle = "#ffffff"; ctx.lineWidth = 2; ctx.stroke();
        return;
      case "triangle":
        ctx.moveTo(x, y - r - 2); ctx.lineTo(x + r + 2, y + r); ctx.lineTo(x - r - 2, y + r); ctx.closePath();
        ctx.fill(); ctx.stroke(); return;
      case "diamond":
        ctx.moveTo(x, y - r - 1); ctx.lineTo(x + r + 1, y); ctx.lineTo(x, y + r + 1); ctx.lineTo(x - r - 1, y); ctx.closePath();
        ctx.fill(); ctx.stroke(); return;
      case "square":
        var q = r - 1;
        ctx.rect(x - q, y - q, 2 * q, 2 * q); ctx.fill(); ctx.stroke(); return;
      case "hollow-triangle-down":
        ctx.moveTo(x, y + r + 1); ctx.lineTo(x + r + 1, y - r); ctx.lineTo(x - r - 1, y - r); ctx.closePath();
        ctx.strokeStyle = fill; ctx.lineWidth = 2; ctx.stroke(); return;
      default: // ring
        ctx.arc(x, y, r, 0, 2 * Math.PI); ctx.strokeStyle = fill; ctx.lineWidth = 2; ctx.stroke();
    }
  }
  function shapeIcon(z, fill) {
    var c = el("canvas", { width: 18, height: 18, "aria-hidden": "true", style: "width:18px;height:18px;cursor:inherit" });
    marker(c.getContext("2d"), ZONES[z].shape, 9, 9, 5, fill || ZONES[z].colour, "#000000");
    return c;
  }
  function lineIcon(stroke) {
    var c = el("canvas", { width: 40, height: 12, "aria-hidden": "true", style: "width:40px;height:12px;cursor:inherit" });
    var x = c.getContext("2d");
    x.strokeStyle = stroke.colour; x.lineWidth = stroke.width;
    x.setLineDash(stroke.dash || []);
    x.beginPath(); x.moveTo(0, 6); x.lineTo(40, 6); x.stroke();
    return c;
  }
  function arrow(ctx, x0, y0, x1, y1, colour) {
    ctx.strokeStyle = colour; ctx.fillStyle = colour; ctx.lineWidth = 1.5; ctx.setLineDash([]);
    ctx.beginPath(); ctx.moveTo(x0, y0); ctx.lineTo(x1, y1); ctx.stroke();
    var a = Math.atan2(y1 - y0, x1 - x0), h = 7;
    if (Math.hypot(x1 - x0, y1 - y0) < 2) return;
    ctx.beginPath(); ctx.moveTo(x1, y1);
    ctx.lineTo(x1 - h * Math.cos(a - 0.4), y1 - h * Math.sin(a - 0.4));
    ctx.lineTo(x1 - h * Math.cos(a + 0.4), y1 - h * Math.sin(a + 0.4));
    ctx.closePath(); ctx.fill();
  }

  // ---- views ----------------------------------------------------------------------------
  var M = { l: 58, r: 12, t: 10, b: 44 };
  function View(name, canvas, xs, ys, home, equal, xLabel, yLabel) {
    this.name = name; this.c = canvas; this.xs = xs; this.ys = ys; this.home = home;
    this.equal = equal; this.xLabel = xLabel; this.yLabel = yLabel; this.box = null;
    this.reset();
  }
  View.prototype.size = function () {
    var r = this.c.getBoundingClientRect();
    return { w: Math.max(200, r.width), h: Math.max(200, r.height) };
  };
  View.prototype.reset = function () {
    var h = this.home, s = this.size();
    var x0 = h[0], x1 = h[1], y0 = h[2], y1 = h[3];
    if (this.equal) {
      var pw = s.w - M.l - M.r, ph = s.h - M.t - M.b;
      var per = Math.max((x1 - x0) / pw, (y1 - y0) / ph), cx = (x0 + x1) / 2, cy = (y0 + y1) / 2;
      x0 = cx - per * pw / 2; x1 = cx + per * pw / 2; y0 = cy - per * ph / 2; y1 = cy + per * ph / 2;
    }
    this.r = [x0, x1, y0, y1];
  };
  View.prototype.px = function (x, y) {
    var s = this.size(), r = this.r;
    return [M.l + (x - r[0]) / (r[1] - r[0]) * (s.w - M.l - M.r),
            M.t + (1 - (y - r[2]) / (r[3] - r[2])) * (s.h - M.t - M.b)];
  };
  View.prototype.data = function (px, py) {
    var s = this.size(), r = this.r;
    return [r[0] + (px - M.l) / (s.w - M.l - M.r) * (r[1] - r[0]),
            r[2] + (1 - (py - M.t) / (s.h - M.t - M.b)) * (r[3] - r[2])];
  };
  View.prototype.zoom = function (k, px, py) {
    var s = this.size();
    if (px == null) { px = M.l + (s.w - M.l - M.r) / 2; py = M.t + (s.h - M.t - M.b) / 2; }
    var c = this.data(px, py), r = this.r;
    this.r = [c[0] + (r[0] - c[0]) / k, c[0] + (r[1] - c[0]) / k, c[1] + (r[2] - c[1]) / k, c[1] + (r[3] - c[1]) / k];
  };
  View.prototype.pan = function (ddx, ddy) {
    var s = this.size(), r = this.r;
    var ux = (r[1] - r[0]) / (s.w - M.l - M.r), uy = (r[3] - r[2]) / (s.h - M.t - M.b);
    this.r = [r[0] - ddx * ux, r[1] - ddx * ux, r[2] + ddy * uy, r[3] + ddy * uy];
  };
  View.prototype.begin = function () {
    var s = this.size(), dpr = window.devicePixelRatio || 1, c = this.c;
    if (c.width !== Math.round(s.w * dpr) || c.height !== Math.round(s.h * dpr)) {
      c.width = Math.round(s.w * dpr); c.height = Math.round(s.h * dpr);
    }
    var ctx = c.getContext("2d");
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.fillStyle = "#ffffff"; ctx.fillRect(0, 0, s.w, s.h);
    return ctx;
  };
  function step(span) {
    var raw = span / 8, p = Math.pow(10, Math.floor(Math.log10(raw))), m = raw / p;
    return p * (m < 1.5 ? 1 : m < 3.5 ? 2 : m < 7.5 ? 5 : 10);
  }
  function tick(v, st) {
    var d = st >= 1 ? 0 : Math.min(6, Math.ceil(-Math.log10(st)));
    return fmt(v, d);
  }
  View.prototype.frame = function (ctx) {
    var s = this.size(), r = this.r, self = this;
    var L = M.l, R = s.w - M.r, T = M.t, B = s.h - M.b;
    ctx.font = "12px 'DejaVu Sans', sans-serif"; ctx.lineWidth = 1; ctx.setLineDash([]);
    var sx = step(r[1] - r[0]), sy = step(r[3] - r[2]);
    if (this.equal) sx = sy = Math.max(sx, sy);
    ctx.strokeStyle = "#e4e4e4"; ctx.fillStyle = "#333333";
    ctx.textAlign = "center"; ctx.textBaseline = "top";
    for (var v = Math.ceil(r[0] / sx) * sx; v <= r[1]; v += sx) {
      var p = self.px(v, 0)[0];
      ctx.beginPath(); ctx.moveTo(p, T); ctx.lineTo(p, B); ctx.stroke();
      ctx.fillText(tick(v, sx), p, B + 4);
    }
    ctx.textAlign = "right"; ctx.textBaseline = "middle";
    for (v = Math.ceil(r[2] / sy) * sy; v <= r[3]; v += sy) {
      var q = self.px(0, v)[1];
      ctx.beginPath(); ctx.moveTo(L, q); ctx.lineTo(R, q); ctx.stroke();
      ctx.fillText(tick(v, sy), L - 5, q);
    }
    ctx.strokeStyle = "#000000"; ctx.strokeRect(L, T, R - L, B - T);
    ctx.textAlign = "center"; ctx.textBaseline = "bottom";
    ctx.fillText(this.xLabel, (L + R) / 2, s.h - 3);
    ctx.save(); ctx.translate(13, (T + B) / 2); ctx.rotate(-Math.PI / 2);
    ctx.textBaseline = "middle"; ctx.fillText(this.yLabel, 0, 0); ctx.restore();
    ctx.save(); ctx.beginPath(); ctx.rect(L, T, R - L, B - T); ctx.clip();
  };

  // ---- density cells: the file's finest cells, merged 2^k at a time for the zoom ----------
  function Cells(spec, perCell) {
    this.size = spec.size; this.i = i32(spec.i); this.j = i32(spec.j); this.per = perCell;
    this.cache = {};
  }
  Cells.prototype.level = function (view) {
    var a = view.px(0, 0), b = view.px(this.size, 0), px = Math.abs(b[0] - a[0]), k = 0;
    while (px * Math.pow(2, k) < 4 && k < 12) k++;
    return k;
  };
  Cells.prototype.merged = function (k, combine, init) {
    if (this.cache[k]) return this.cache[k];
    var out = new Map();
    for (var c = 0; c < this.i.length; c++) {
      var key = (this.i[c] >> k) + "," + (this.j[c] >> k), acc = out.get(key);
      if (!acc) { acc = init(this.i[c] >> k, this.j[c] >> k); out.set(key, acc); }
      combine(acc, c);
    }
    return (this.cache[k] = out);
  };
  var density = D.density ? new Cells(D.density) : null;
  var dc = D.density ? i32(D.density.c) : null;
  var cells = D.cells ? new Cells(D.cells) : null;
  var cn = D.cells ? i32(D.cells.n) : null, cz = D.cells ? u8(D.cells.zone) : null;
  var cmc = D.cells ? u8(D.cells.mc) : null;

  function colourOfIndex(ix) { return ix === 255 ? D.scale.grey : D.scale.palette[ix]; }
  function alpha(hex, a) {
    var n = parseInt(hex.slice(1), 16);
    return "rgba(" + (n >> 16) + "," + ((n >> 8) & 255) + "," + (n & 255) + "," + a.toFixed(3) + ")";
  }
  function drawDensity(view, ctx) {
    var k = density.level(view), size = density.size * Math.pow(2, k);
    var m = density.merged(k, function (acc, c) {
      for (var z = 0; z < 6; z++) acc.n[z] += dc[6 * c + z];
    }, function (i, j) { return { i: i, j: j, n: [0, 0, 0, 0, 0, 0] }; });
    // Failed and marginal locations drawn as points are not counted again in the cells.
    var kept = new Map();
    for (var p = 0; p < N; p++) {
      var key = Math.floor(dx[p] / size) + "," + Math.floor(dy[p] / size);
      var e = kept.get(key) || [0, 0, 0, 0, 0, 0];
      e[zone[p]]++; kept.set(key, e);
    }
    var list = [], most = 1;
    m.forEach(function (c, key) {
      var have = kept.get(key) || [0, 0, 0, 0, 0, 0], quiet = 0, top = 5, best = -1, risk = 0;
      for (var z = 0; z < 6; z++) {
        var n = shown[z] ? Math.max(0, c.n[z] - have[z]) : 0;
        if (z < 2) risk += n; else { quiet += n; if (n > best) { best = n; top = z; } }
      }
      var rz = (shown[0] && c.n[0] - have[0] > 0) ? 0 : 1;
      list.push([c.i, c.j, quiet, top, risk, rz]);
      most = Math.max(most, quiet, risk);
    });
    var lm = Math.log(1 + most);
    [false, true].forEach(function (risky) {
      list.forEach(function (c) {
        var n = risky ? c[4] : c[2], z = risky ? c[5] : c[3];
        if (!n) return;
        var a = view.px(c[0] * size, (c[1] + 1) * size), b = view.px((c[0] + 1) * size, c[1] * size);
        ctx.fillStyle = alpha(ZONES[z].colour, 0.25 + 0.7 * Math.log(1 + n) / lm);
        ctx.fillRect(a[0], a[1], Math.max(1, b[0] - a[0]), Math.max(1, b[1] - a[1]));
      });
    });
  }
  function drawCells(view, ctx) {
    var k = cells.level(view), size = cells.size * Math.pow(2, k);
    var m = cells.merged(k, function (acc, c) {
      acc.n += cn[c]; acc.zone = Math.min(acc.zone, cz[c]); acc.mc = Math.min(acc.mc, cmc[c]);
    }, function (i, j) { return { i: i, j: j, n: 0, zone: 5, mc: 255 }; });
    m.forEach(function (c) {
      if (!shown[c.zone]) return;
      var a = view.px(c.i * size, (c.j + 1) * size), b = view.px((c.i + 1) * size, c.j * size);
      ctx.fillStyle = colourOfIndex(c.mc);
      ctx.fillRect(a[0], a[1], Math.max(1, b[0] - a[0] + 0.5), Math.max(1, b[1] - a[1] + 0.5));
    });
  }

  // ---- drawing --------------------------------------------------------------------------
  function changeColour(i) {
    var c = change[i];
    return c === 0 ? D.changeColours.improved : c === 1 ? D.changeColours.worsened : D.changeColours.unchanged;
  }
  function order() {
    // Best zones first, so that the worst are drawn on top.
    var o = [];
    for (var z = 5; z >= 0; z--) for (var i = 0; i < N; i++) if (zone[i] === z && visible(i)) o.push(i);
    return o;
  }
  var drawOrder = null;
  function ring(ctx, p, r, dashed) {
    ctx.setLineDash(dashed ? [3, 3] : []);
    ctx.beginPath(); ctx.arc(p[0], p[1], r, 0, 2 * Math.PI);
    ctx.lineWidth = 4; ctx.strokeStyle = "#ffffff"; ctx.stroke();
    ctx.lineWidth = 2; ctx.strokeStyle = "#000000"; ctx.stroke();
    ctx.setLineDash([]);
  }
  function drawFld() {
    var v = views.fld, ctx = v.begin(), log = { zones: {}, highlighted: [], arrows: [] };
    v.frame(ctx);
    D.lines.forEach(function (l) {
      var st = D.strokes[l.kind];
      ctx.strokeStyle = st.colour; ctx.lineWidth = st.width; ctx.setLineDash(st.dash || []);
      ctx.beginPath();
      for (var i = 0; i < l.x.length; i++) {
        var p = v.px(l.x[i], l.y[i]);
        if (i) ctx.lineTo(p[0], p[1]); else ctx.moveTo(p[0], p[1]);
      }
      ctx.stroke();
    });
    ctx.setLineDash([]);
    if (density) drawDensity(v, ctx);
    drawOrder = drawOrder || order();
    var r = N > 1000 ? 4 : 5;
    if (COMPARE) drawOrder.forEach(function (i) {
      if (isNaN(fx[i])) return;
      var a = v.px(fx[i], fy[i]), b = v.px(dx[i], dy[i]);
      arrow(ctx, a[0], a[1], b[0], b[1], changeColour(i));
      log.arrows.push(ids[i]);
    });
    drawOrder.forEach(function (i) {
      var p = v.px(dx[i], dy[i]), z = zone[i];
      marker(ctx, ZONES[z].shape, p[0], p[1], r, ZONES[z].colour, "#000000");
      if (border && border[i]) { ctx.setLineDash([3, 3]); ctx.strokeStyle = "#000000"; ctx.lineWidth = 1; ctx.beginPath(); ctx.arc(p[0], p[1], 11, 0, 2 * Math.PI); ctx.stroke(); ctx.setLineDash([]); }
      log.zones[ZN[z]] = (log.zones[ZN[z]] || 0) + 1;
    });
    highlight(v, ctx, dx, dy, log);
    ctx.restore();
    drawBox(v, ctx);
    drawnLog.fld = log;
  }
  function highlight(v, ctx, xs, ys, log) {
    selected.forEach(function (i) {
      if (isNaN(xs[i])) return;
      ring(ctx, v.px(xs[i], ys[i]), i === current ? 13 : 10, false);
      log.highlighted.push(ids[i]);
    });
    if (hover >= 0 && !isNaN(xs[hover])) ring(ctx, v.px(xs[hover], ys[hover]), 15, true);
  }
  function drawBox(v, ctx) {
    if (!v.box) return;
    var b = v.box;
    ctx.setLineDash([5, 4]); ctx.strokeStyle = "#000000"; ctx.lineWidth = 1.5;
    ctx.fillStyle = "rgba(0,0,0,0.06)";
    ctx.fillRect(b[0], b[1], b[2] - b[0], b[3] - b[1]);
    ctx.strokeRect(b[0], b[1], b[2] - b[0], b[3] - b[1]);
    ctx.setLineDash([]);
  }
  function mapFill(i) {
    var z = ZONES[zone[i]];
    if (z.hollow) return z.colour;
    if (COMPARE) return changeColour(i);
    return colourOfIndex(mc[i]);
  }
  function drawMap() {
    var v = views.map;
    if (!v) return;
    var ctx = v.begin(), log = { zones: {}, highlighted: [], arrows: [] };
    v.frame(ctx);
    if (cells) drawCells(v, ctx);
    drawOrder = drawOrder || order();
    var r = N > 1000 ? 4 : 6;
    if (COMPARE) drawOrder.forEach(function (i) {
      if (isNaN(mfx[i]) || isNaN(mx[i]) || (mfx[i] === mx[i] && mfy[i] === my[i])) return;
      var a = v.px(mfx[i], mfy[i]), b = v.px(mx[i], my[i]);
      arrow(ctx, a[0], a[1], b[0], b[1], changeColour(i));
      log.arrows.push(ids[i]);
    });
    drawOrder.forEach(function (i) {
      if (isNaN(mx[i])) return;
      var p = v.px(mx[i], my[i]), z = zone[i];
      marker(ctx, ZONES[z].shape, p[0], p[1], r, mapFill(i), "#000000");
      log.zones[ZN[z]] = (log.zones[ZN[z]] || 0) + 1;
    });
    highlight(v, ctx, mx, my, log);
    ctx.restore();
    drawBox(v, ctx);
    drawnLog.map = log;
  }
  var pending = false;
  function redraw(now) {
    if (now) { pending = false; drawFld(); drawMap(); return; }
    if (pending) return;
    pending = true;
    requestAnimationFrame(function () { if (pending) redraw(true); });
  }

  // ---- page -----------------------------------------------------------------------------
  var root = el("div", { id: "neckline-review" });
  document.body.appendChild(root);
  var header = el("header", {}, [
    el("h1", { text: D.title }),
    el("p", { class: "sub", text: D.sub[0] }),
    el("p", { class: "sub", text: D.sub[1] }),
    el("p", { class: "caution", text: D.caution })
  ]);
  root.appendChild(header);
  var status = el("p", { class: "sr", role: "status", "aria-live": "polite", id: "status" });
  root.appendChild(status);
  function say(t) { status.textContent = t; }

  var search = el("input", { type: "search", id: "find", placeholder: "id, e.g. " + (ids[0] || "A01"), size: "14" });
  var modeSel = el("input", { type: "radio", name: "mode", id: "mode-select", value: "select", checked: "checked" });
  var modePan = el("input", { type: "radio", name: "mode", id: "mode-pan", value: "pan" });
  var toolbar = el("div", { class: "toolbar", role: "toolbar", "aria-label": "View tools" }, [
    el("fieldset", {}, [el("legend", { text: "Drag to" }),
      modeSel, el("label", { for: "mode-select", text: "select a box" }),
      modePan, el("label", { for: "mode-pan", text: "pan" })]),
    el("button", { type: "button", id: "zoom-in", "aria-label": "Zoom in (both views)", text: "Zoom +", onclick: function () { eachView(function (v) { v.zoom(1.5); }); redraw(); } }),
    el("button", { type: "button", id: "zoom-out", "aria-label": "Zoom out (both views)", text: "Zoom −", onclick: function () { eachView(function (v) { v.zoom(1 / 1.5); }); redraw(); } }),
    el("button", { type: "button", id: "reset", "aria-label": "Reset zoom and pan of both views", text: "Reset view", onclick: function () { eachView(function (v) { v.reset(); }); redraw(); } }),
    el("label", { for: "find", text: "Find id" }), search,
    el("button", { type: "button", id: "find-go", text: "Find", onclick: function () { find(search.value); } }),
    el("button", { type: "button", id: "clear", text: "Clear selection", onclick: function () { setSelection([], -1); } })
  ]);
  search.addEventListener("keydown", function (e) { if (e.key === "Enter") find(search.value); });
  [modeSel, modePan].forEach(function (r) {
    r.addEventListener("change", function () {
      mode = r.value;
      eachView(function (v) { v.c.classList.toggle("pan", mode === "pan"); });
    });
  });
  root.appendChild(toolbar);

  var main = el("div", { class: "main" + (D.map ? "" : " nomap") });
  root.appendChild(main);
  var hint = "hover: values · click: select · drag: box · wheel: zoom";
  var fldCanvas = el("canvas", { id: "fld-canvas", tabindex: "0", role: "img", "aria-label": "Forming-limit diagram: " + D.fld.yLabel + " against " + D.fld.xLabel + "; arrow keys pan, + and − zoom, 0 resets" });
  main.appendChild(el("figure", { id: "fld" }, [el("figcaption", {}, ["Forming-limit diagram ", el("span", { class: "hint", text: hint })]), fldCanvas]));
  var mapCanvas = null;
  if (D.map) {
    mapCanvas = el("canvas", { id: "map-canvas", tabindex: "0", role: "img", "aria-label": "Part map, equal scale: " + D.map.yLabel + " against " + D.map.xLabel + "; arrow keys pan, + and − zoom, 0 resets" });
    main.appendChild(el("figure", { id: "map" }, [el("figcaption", {}, ["Part map ", el("span", { class: "hint", text: COMPARE ? "fill: change of margin; shape: zone now" : "fill: margin to the curve; shape: zone" })]), mapCanvas]));
  }
  var aside = el("aside", {});
  main.appendChild(aside);

  // Zone toggles, with their shape: shape first, colour second.
  var zoneBoxes = [];
  var zf = el("fieldset", { id: "zones" }, [el("legend", { text: "Zones shown (locations)" })]);
  ZONES.forEach(function (z, k) {
    var cb = el("input", { type: "checkbox", id: "zone-" + z.name, checked: "checked", "data-zone": z.name });
    cb.addEventListener("change", function () { shown[k] = cb.checked; filtersChanged(); });
    zoneBoxes.push(cb);
    zf.appendChild(el("label", { for: "zone-" + z.name }, [cb, shapeIcon(k), z.name, el("span", { class: "n", text: String(D.counts[k]) })]));
  });
  aside.appendChild(zf);
  var changeBoxes = [];
  if (COMPARE) {
    var cf = el("fieldset", { id: "changes" }, [el("legend", { text: "Changes shown (" + D.labels[0] + " → " + D.labels[1] + ")" })]);
    var ccount = CHANGES.map(function () { return 0; });
    for (var t = 0; t < N; t++) ccount[change[t]]++;
    CHANGES.forEach(function (name, k) {
      var cb = el("input", { type: "checkbox", id: "change-" + name, checked: "checked", "data-change": name });
      cb.addEventListener("change", function () { shownChange[k] = cb.checked; filtersChanged(); });
      changeBoxes.push(cb);
      var words = { improved: "improved (margin up)", worsened: "worsened (margin down)", unchanged: "unchanged (within ±" + D.tolerance + " pp)", "new": "new (only in " + D.labels[1] + ")", gone: "gone (only in " + D.labels[0] + ")" }[name];
      var key = el("span", { "aria-hidden": "true", style: "display:inline-block;width:18px;text-align:center;color:" + (k === 0 ? D.changeColours.improved : k === 1 ? D.changeColours.worsened : D.changeColours.unchanged), text: k < 3 ? "→" : k === 3 ? "+" : "×" });
      cf.appendChild(el("label", { for: "change-" + name }, [cb, key, words, el("span", { class: "n", text: String(ccount[k]) })]));
    });
    aside.appendChild(cf);
  }
  // Lines, in the styles of the static diagram.
  var lf = el("fieldset", {}, [el("legend", { text: "Lines" })]);
  var seen = {};
  D.lines.slice().reverse().forEach(function (l) {
    var label = l.kind === "reference" ? "strain paths" : l.kind === "thinning" ? "thinning iso-lines" : l.name;
    if (seen[label]) return;
    seen[label] = 1;
    lf.appendChild(el("div", { class: "key" }, [lineIcon(D.strokes[l.kind]), label]));
  });
  aside.appendChild(lf);
  if (!D.complete) {
    aside.appendChild(el("p", { class: "note", text: COMPARE
      ? N + " of " + D.total + " locations drawn: those at risk now, new or worsened first."
      : "Shaded cells: density of " + D.total + " locations; points: " + N + " failed, marginal or worst (zoom in for finer cells)." }));
  }
  // The worst list: Tab or the arrow keys move the focus, and focus selects.
  aside.appendChild(el("h2", { id: "worst-h", text: COMPARE ? "Largest losses of margin" : "Worst: failed first, then margin" }));
  var worstList = el("ol", { class: "worst", "aria-labelledby": "worst-h" });
  var worstButtons = [];
  D.worst.forEach(function (i, k) {
    var words = COMPARE
      ? ids[i] + " — " + ZN[zone[i]] + ", margin change " + fmt(dmargin[i]) + " pp"
      : ids[i] + " — " + ZN[zone[i]] + (isNaN(margin[i]) ? "" : ", margin " + fmt(margin[i]) + " pp");
    var b = el("button", { type: "button", "aria-pressed": "false", "data-id": ids[i], "aria-label": "Select " + words }, [shapeIcon(zone[i]), words]);
    b.addEventListener("focus", function () { setSelection([i], i, true); });
    b.addEventListener("click", function () { setSelection([i], i, true); });
    b.addEventListener("keydown", function (e) {
      var to = e.key === "ArrowDown" ? k + 1 : e.key === "ArrowUp" ? k - 1 : e.key === "Home" ? 0 : e.key === "End" ? worstButtons.length - 1 : -2;
      if (to === -2) return;
      e.preventDefault();
      if (to >= 0 && to < worstButtons.length) worstButtons[to].focus();
    });
    worstButtons.push(b);
    worstList.appendChild(el("li", {}, [b]));
  });
  aside.appendChild(worstList);

  // The table of the selection.
  var cols = COMPARE ? [
    ["id", "id", function (i) { return ids[i]; }, true],
    ["zone_before", "zone " + D.labels[0], function (i) { return zoneBefore[i] === 255 ? "" : ZN[zoneBefore[i]]; }, true],
    ["zone", "zone " + D.labels[1], function (i) { return change[i] === 4 ? "" : ZN[zone[i]]; }, true],
    ["change", "change", function (i) { return CHANGES[change[i]]; }, true],
    ["margin_before_pp", "margin " + D.labels[0] + ", pp", function (i) { return marginBefore[i]; }],
    ["margin_pp", "margin " + D.labels[1] + ", pp", function (i) { return change[i] === 4 ? NaN : margin[i]; }],
    ["margin_change_pp", "margin change, pp", function (i) { return dmargin[i]; }],
    ["major_eng_pct", "major, %", function (i) { return major[i]; }],
    ["minor_eng_pct", "minor, %", function (i) { return minor[i]; }],
    ["x", "x", function (i) { return mx[i]; }],
    ["y", "y", function (i) { return my[i]; }]
  ] : [
    ["id", "id", function (i) { return ids[i]; }, true],
    ["zone", "zone", function (i) { return ZN[zone[i]]; }, true],
    ["major_eng_pct", "major, %", function (i) { return major[i]; }],
    ["minor_eng_pct", "minor, %", function (i) { return minor[i]; }],
    ["thinning_pct", "thinning, %", function (i) { return thin[i]; }],
    ["margin_pp", "margin, pp", function (i) { return margin[i]; }],
    ["limit_use_pct", "limit use, %", function (i) { return use[i]; }],
    ["reason", "reason", function (i) { return reason[i] >= 0 ? P.reasons[reason[i]] : ""; }, true],
    ["x", "x, " + D.unit, function (i) { return mx[i]; }],
    ["y", "y, " + D.unit, function (i) { return my[i]; }]
  ];
  var tableWrap = el("section", { class: "table-wrap", "aria-labelledby": "sel-h" });
  var selH = el("h2", { id: "sel-h", text: "Selection" });
  var copyBtn = el("button", { type: "button", id: "copy-csv", text: "Copy as CSV", onclick: copyCsv });
  var csvArea = el("textarea", { class: "csv", id: "csv-text", readonly: "readonly", "aria-label": "The selection as CSV" });
  var thead = el("thead"), tbody = el("tbody");
  var headRow = el("tr");
  cols.forEach(function (c, k) {
    var b = el("button", { type: "button", text: c[1], "aria-label": "Sort by " + c[1] });
    b.addEventListener("click", function () {
      if (sortKey === k) sortDir = -sortDir; else { sortKey = k; sortDir = 1; }
      fillTable();
    });
    headRow.appendChild(el("th", { scope: "col", class: c[3] ? "t" : "", "aria-sort": "none" }, [b]));
  });
  thead.appendChild(headRow);
  var table = el("table", { id: "selection" }, [el("caption", { class: "sr", text: "Selected locations" }), thead, tbody]);
  tableWrap.appendChild(el("div", { style: "display:flex;gap:12px;align-items:baseline" }, [selH, copyBtn, el("span", { class: "note", id: "sel-note" })]));
  tableWrap.appendChild(el("div", { class: "table-scroll" }, [table]));
  tableWrap.appendChild(csvArea);
  root.appendChild(tableWrap);
  var tip = el("div", { id: "tip", role: "tooltip" });
  root.appendChild(tip);

  var TABLE_MAX = 2000;
  function sortedSelection() {
    var rows = Array.from(selected);
    if (sortKey != null) {
      var f = cols[sortKey][2], text = cols[sortKey][3];
      rows.sort(function (a, b) {
        var x = f(a), y = f(b);
        if (text) return sortDir * String(x).localeCompare(String(y), undefined, { numeric: true });
        if (isNaN(x)) return 1; if (isNaN(y)) return -1;
        return sortDir * (x - y);
      });
    } else rows.sort(function (a, b) { return a - b; });
    return rows;
  }
  function cellText(c, i) {
    var v = c[2](i);
    return c[3] ? String(v) : fmt(v, c[0] === "x" || c[0] === "y" ? 2 : 1);
  }
  function fillTable() {
    var rows = sortedSelection();
    Array.prototype.forEach.call(headRow.children, function (th, k) {
      th.setAttribute("aria-sort", sortKey === k ? (sortDir > 0 ? "ascending" : "descending") : "none");
    });
    tbody.textContent = "";
    var frag = document.createDocumentFragment();
    rows.slice(0, TABLE_MAX).forEach(function (i) {
      var tr = el("tr", { "data-id": ids[i] });
      if (i === current) tr.className = "current";
      cols.forEach(function (c) { tr.appendChild(el("td", { class: c[3] ? "t" : "", text: cellText(c, i) })); });
      tr.addEventListener("click", function () { current = i; fillTable(); redraw(); });
      frag.appendChild(tr);
    });
    tbody.appendChild(frag);
    document.getElementById("sel-note").textContent = rows.length
      ? rows.length + " selected" + (rows.length > TABLE_MAX ? " (first " + TABLE_MAX + " shown; Copy as CSV holds all)" : "")
      : "nothing selected: click a location, draw a box, search an id or use the worst list";
    // The current row is brought into the table's own view (the page itself does not move).
    var cur = tbody.querySelector("tr.current"), box = table.parentNode;
    if (cur) {
      var top = cur.offsetTop - thead.offsetHeight;
      if (top < box.scrollTop || cur.offsetTop + cur.offsetHeight > box.scrollTop + box.clientHeight) box.scrollTop = Math.max(0, top);
    }
  }
  function csvField(s) { return /[",\n]/.test(s) ? '"' + s.replace(/"/g, '""') + '"' : s; }
  function selectionCsv() {
    var lines = [cols.map(function (c) { return c[0]; }).join(",")];
    sortedSelection().forEach(function (i) {
      lines.push(cols.map(function (c) {
        var v = c[2](i);
        return c[3] ? csvField(String(v)) : (isNaN(v) ? "" : (+v).toFixed(c[0] === "x" || c[0] === "y" ? 3 : 2));
      }).join(","));
    });
    return lines.join("\n") + "\n";
  }
  function copyCsv() {
    var text = selectionCsv();
    csvArea.value = text;
    var fallback = function () {
      csvArea.style.display = "block"; csvArea.focus(); csvArea.select();
      var ok = false;
      try { ok = document.execCommand("copy"); } catch (e) { ok = false; }
      say(ok ? "Selection copied as CSV" : "Selection shown as CSV below: copy it with Ctrl+C");
    };
    if (navigator.clipboard && navigator.clipboard.writeText) {
      navigator.clipboard.writeText(text).then(function () { say("Selection copied as CSV"); }, fallback);
    } else fallback();
  }

  // ---- selection and filters --------------------------------------------------------------
  function setSelection(list, cur, fromWorst) {
    selected = new Set(list);
    current = cur != null ? cur : (list.length === 1 ? list[0] : -1);
    worstButtons.forEach(function (b) { b.setAttribute("aria-pressed", String(current >= 0 && b.getAttribute("data-id") === ids[current])); });
    fillTable();
    redraw();
    if (list.length === 1) say(describe(list[0]).replace(/\n/g, "; "));
    else say(list.length + " locations selected");
    return fromWorst;
  }
  function find(text) {
    var q = String(text || "").trim();
    if (!q) return [];
    if (q in byId) { setSelection([byId[q]], byId[q]); return [byId[q]]; }
    var lq = q.toLowerCase(), hits = [];
    for (var i = 0; i < N; i++) if (ids[i].toLowerCase().indexOf(lq) === 0) hits.push(i);
    setSelection(hits, hits.length ? hits[0] : -1);
    if (!hits.length) say("No drawn location has the id " + q);
    return hits;
  }
  function filtersChanged() {
    drawOrder = null;
    if (density) density.cache = {};
    redraw();
  }
  function describe(i) {
    if (COMPARE) {
      var c = CHANGES[change[i]];
      return ids[i] + "\nchange: " + c + (isNaN(dmargin[i]) ? "" : " (" + fmt(dmargin[i]) + " pp)") +
        "\nzone: " + (zoneBefore[i] === 255 ? "—" : ZN[zoneBefore[i]]) + " → " + (change[i] === 4 ? "—" : ZN[zone[i]]) +
        "\nmargin: " + fmt(marginBefore[i]) + " → " + fmt(change[i] === 4 ? NaN : margin[i]) + " pp" +
        "\nmajor " + fmt(major[i]) + " %, minor " + fmt(minor[i]) + " % (" + (change[i] === 4 ? D.labels[0] : D.labels[1]) + ")";
    }
    return ids[i] + "\nzone: " + ZN[zone[i]] + (border[i] ? " (borderline)" : "") +
      "\nmajor " + fmt(major[i]) + " %, minor " + fmt(minor[i]) + " % (engineering)" +
      "\nthinning " + fmt(thin[i]) + " %, margin " + fmt(margin[i]) + " pp, limit use " + fmt(use[i], 0) + " %" +
      "\nreason: " + (reason[i] >= 0 ? P.reasons[reason[i]] : "");
  }

  // ---- interaction ----------------------------------------------------------------------
  var views = { fld: null, map: null };
  function eachView(f) { f(views.fld); if (views.map) f(views.map); }
  function coords(v) { return v.name === "fld" ? [dx, dy] : [mx, my]; }
  function nearest(v, px, py) {
    var xy = coords(v), best = -1, bd = 100;
    for (var i = 0; i < N; i++) {
      if (!visible(i) || isNaN(xy[0][i])) continue;
      var p = v.px(xy[0][i], xy[1][i]), d = (p[0] - px) * (p[0] - px) + (p[1] - py) * (p[1] - py);
      if (d < bd) { bd = d; best = i; }
    }
    return best;
  }
  function inBox(v, b) {
    var xy = coords(v), a = v.data(Math.min(b[0], b[2]), Math.max(b[1], b[3])), c = v.data(Math.max(b[0], b[2]), Math.min(b[1], b[3]));
    var out = [];
    for (var i = 0; i < N; i++) {
      var x = xy[0][i], y = xy[1][i];
      if (visible(i) && x >= a[0] && x <= c[0] && y >= a[1] && y <= c[1]) out.push(i);
    }
    return out;
  }
  function attach(v) {
    var c = v.c, drag = null;
    function local(e) { var r = c.getBoundingClientRect(); return [e.clientX - r.left, e.clientY - r.top]; }
    c.addEventListener("pointerdown", function (e) {
      var p = local(e);
      drag = { x: p[0], y: p[1], pan: mode === "pan" || e.button === 1, add: e.shiftKey || e.ctrlKey || e.metaKey, moved: false };
      if (c.setPointerCapture && e.pointerId != null) { try { c.setPointerCapture(e.pointerId); } catch (err) { /* synthetic events */ } }
      e.preventDefault();
    });
    c.addEventListener("pointermove", function (e) {
      var p = local(e);
      if (drag) {
        if (Math.abs(p[0] - drag.x) + Math.abs(p[1] - drag.y) > 4) drag.moved = true;
        if (drag.pan) { v.pan(p[0] - drag.x, p[1] - drag.y); drag.x = p[0]; drag.y = p[1]; }
        else if (drag.moved) v.box = [drag.x, drag.y, p[0], p[1]];
        redraw();
        return;
      }
      var i = nearest(v, p[0], p[1]);
      if (i !== hover) { hover = i; redraw(); }
      if (i >= 0) {
        tip.textContent = "";
        describe(i).split("\n").forEach(function (line, k) { tip.appendChild(k ? el("div", { text: line }) : el("b", { text: line })); });
        tip.style.display = "block";
        tip.style.left = Math.min(window.innerWidth - 350, e.clientX + 14) + "px";
        tip.style.top = (e.clientY + 14) + "px";
      } else tip.style.display = "none";
    });
    c.addEventListener("pointerleave", function () { if (!drag) { hover = -1; tip.style.display = "none"; redraw(); } });
    c.addEventListener("pointerup", function (e) {
      if (!drag) return;
      var p = local(e), d = drag;
      drag = null;
      if (d.pan) return;
      if (d.moved && v.box) {
        var hits = inBox(v, v.box);
        v.box = null;
        if (d.add) selected.forEach(function (i) { if (hits.indexOf(i) < 0) hits.push(i); });
        setSelection(hits, hits.length === 1 ? hits[0] : -1);
        return;
      }
      var i = nearest(v, p[0], p[1]);
      if (i < 0) { if (!d.add) setSelection([], -1); return; }
      if (d.add) {
        var s = Array.from(selected), at = s.indexOf(i);
        if (at >= 0) s.splice(at, 1); else s.push(i);
        setSelection(s, i);
      } else setSelection([i], i);
    });
    c.addEventListener("wheel", function (e) {
      e.preventDefault();
      var p = local(e);
      v.zoom(Math.pow(1.2, -e.deltaY / 100), p[0], p[1]);
      redraw();
    }, { passive: false });
    c.addEventListener("keydown", function (e) {
      var s = 40, done = true;
      if (e.key === "+" || e.key === "=") v.zoom(1.5);
      else if (e.key === "-") v.zoom(1 / 1.5);
      else if (e.key === "0") v.reset();
      else if (e.key === "ArrowLeft") v.pan(s, 0);
      else if (e.key === "ArrowRight") v.pan(-s, 0);
      else if (e.key === "ArrowUp") v.pan(0, s);
      else if (e.key === "ArrowDown") v.pan(0, -s);
      else if (e.key === "Escape") setSelection([], -1);
      else done = false;
      if (done) { e.preventDefault(); redraw(); }
    });
  }

  var f = D.fld;
  views.fld = new View("fld", fldCanvas, null, null, [f.x[0], f.x[1], f.y[0], f.y[1]], false, f.xLabel, f.yLabel);
  attach(views.fld);
  if (D.map) {
    var e = D.map.extent, pad = 0.06 * Math.max(e[2] - e[0], e[3] - e[1], 1);
    views.map = new View("map", mapCanvas, null, null, [e[0] - pad, e[2] + pad, e[1] - pad, e[3] + pad], true, D.map.xLabel, D.map.yLabel);
    attach(views.map);
  }
  var lastSize = "";
  window.addEventListener("resize", function () {
    var s = JSON.stringify(views.fld.size());
    if (s !== lastSize) { lastSize = s; eachView(function (v) { v.reset(); }); redraw(); }
  });

  // ---- the scripting hook ---------------------------------------------------------------
  function names(list) { return list.map(function (i) { return ids[i]; }); }
  window.neckline = {
    /** Select the location `id` (or every id of an array) in both views; true when found. */
    select: function (id) {
      var list = (Array.isArray(id) ? id : [id]).map(function (s) { return byId[String(s)]; }).filter(function (i) { return i != null; });
      setSelection(list, list.length ? list[0] : -1);
      redraw(true);
      return list.length > 0;
    },
    /** The selected ids. */
    selected: function () { return names(sortedSelection()); },
    /** Show only these zones (and, on a comparison, changes: improved, worsened, unchanged, new, gone); an empty or missing list shows all. */
    filter: function (list) {
      var want = (list || []).map(String), zs = want.filter(function (w) { return ZN.indexOf(w) >= 0; });
      var cs = want.filter(function (w) { return CHANGES.indexOf(w) >= 0; });
      ZN.forEach(function (z, k) { shown[k] = !zs.length || zs.indexOf(z) >= 0; zoneBoxes[k].checked = shown[k]; });
      CHANGES.forEach(function (c, k) { shownChange[k] = !cs.length || cs.indexOf(c) >= 0; if (changeBoxes[k]) changeBoxes[k].checked = shownChange[k]; });
      filtersChanged();
      redraw(true);
      return this.counts();
    },
    /** Locations shown per zone, under the zone (and change) filters. */
    counts: function () {
      var out = {};
      ZN.forEach(function (z, k) { out[z] = 0; if (!COMPARE && shown[k]) out[z] = D.counts[k]; });
      if (COMPARE) for (var i = 0; i < N; i++) if (visible(i)) out[ZN[zone[i]]]++;
      return out;
    },
    /** For tests: what the last drawing drew in each view (markers per zone, highlighted ids, arrows). */
    drawn: function () { redraw(true); return JSON.parse(JSON.stringify(drawnLog)); },
    /** For tests: the page pixel (client coordinates) of a data point in a view ("fld" or "map"). */
    toScreen: function (view, x, y) {
      var v = views[view], r = v.c.getBoundingClientRect(), p = v.px(x, y);
      return [r.left + p[0], r.top + p[1]];
    }
  };

  fillTable();
  redraw(true);
  var ready = performance.now();
  document.documentElement.setAttribute("data-ready-ms", ready.toFixed(0));
  window.neckline.readyMs = ready;
  document.dispatchEvent(new Event("neckline-ready"));
})();
