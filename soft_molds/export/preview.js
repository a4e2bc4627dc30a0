// Offline 3-D preview of one mold set: canvas 2-D, painter's algorithm, no network.
// Reads the JSON in <script id="mold-data">: parts with base64 little-endian arrays
// (vertices as uint16 quantised over the set's box, faces as uint16 or uint32 indices),
// the explode offset (mm) and colour of each part. Drag to turn, slider to explode,
// checkboxes to hide parts. window.moldPreview and the canvas's data-drawn attribute report the
// triangles of each part the last frame drew.
(function () {
  "use strict";
  var data = JSON.parse(document.getElementById("mold-data").textContent);

  function bytes(b64) {
    var s = atob(b64), out = new Uint8Array(s.length);
    for (var i = 0; i < s.length; i++) out[i] = s.charCodeAt(i);
    return out.buffer;
  }

  var lo = data.box_lo, span = data.box_span;
  var parts = data.parts.map(function (p) {
    var q = new Uint16Array(bytes(p.vertices));
    var v = new Float64Array(q.length);
    for (var i = 0; i < q.length; i++) v[i] = lo[i % 3] + q[i] / 65535 * span[i % 3];
    var f = p.index_bytes === 2 ? new Uint16Array(bytes(p.faces)) : new Uint32Array(bytes(p.faces));
    var rgb = [1, 3, 5].map(function (k) { return parseInt(p.colour.substr(k, 2), 16); });
    return { name: p.name, role: p.role, v: v, f: f, rgb: rgb, offset: p.offset_mm,
             label: p.label_mm, shown: true };
  });

  var canvas = document.getElementById("view");
  var ctx = canvas.getContext("2d");
  var state = { yaw: -0.56, pitch: 0.42, explode: 1.0 };
  var radius = data.radius_mm, centre = data.centre_mm;

  function rotate(x, y, z) {
    // world (x, v, w) with w up -> screen (sx right, sy up, depth toward the viewer)
    var cy = Math.cos(state.yaw), sy = Math.sin(state.yaw);
    var cp = Math.cos(state.pitch), sp = Math.sin(state.pitch);
    var a = cy * x - sy * y, b = sy * x + cy * y;  // turn about w; b points away
    return [a, cp * z + sp * b, sp * z - cp * b];
  }

  function draw() {
    var w = canvas.width, h = canvas.height, s = 0.48 * Math.min(w, h) / radius;
    ctx.fillStyle = "#ffffff";
    ctx.fillRect(0, 0, w, h);
    var tris = [], report = {};
    parts.forEach(function (p) {
      report[p.name] = 0;
      if (!p.shown) return;
      var n = p.v.length / 3, sc = new Float64Array(n * 3);
      for (var i = 0; i < n; i++) {
        var r = rotate(p.v[3 * i] + state.explode * p.offset[0] - centre[0],
                       p.v[3 * i + 1] + state.explode * p.offset[1] - centre[1],
                       p.v[3 * i + 2] + state.explode * p.offset[2] - centre[2]);
        sc[3 * i] = w / 2 + s * r[0];
        sc[3 * i + 1] = h / 2 - s * r[1];
        sc[3 * i + 2] = r[2];
      }
      for (var k = 0; k < p.f.length; k += 3) {
        var a = 3 * p.f[k], b = 3 * p.f[k + 1], c = 3 * p.f[k + 2];
        // screen-space normal's z (2-D cross product) and depth for shading and sorting
        var ux = sc[b] - sc[a], uy = sc[b + 1] - sc[a + 1], uz = sc[b + 2] - sc[a + 2];
        var vx = sc[c] - sc[a], vy = sc[c + 1] - sc[a + 1], vz = sc[c + 2] - sc[a + 2];
        var nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
        var len = Math.sqrt(nx * nx + ny * ny + nz * nz) || 1;
        var lit = 0.45 + 0.55 * Math.abs((0.3 * nx - 0.5 * ny + 0.8 * nz) / len / 0.99);
        tris.push([(sc[a + 2] + sc[b + 2] + sc[c + 2]) / 3, sc, a, b, c, p.rgb, Math.min(lit, 1)]);
        report[p.name]++;
      }
    });
    tris.sort(function (t, u) { return t[0] - u[0]; });
    for (var i = 0; i < tris.length; i++) {
      var t = tris[i], sc = t[1], rgb = t[5], l = t[6];
      var col = "rgb(" + Math.round(rgb[0] * l) + "," + Math.round(rgb[1] * l) + "," +
                Math.round(rgb[2] * l) + ")";
      ctx.fillStyle = col;
      ctx.strokeStyle = col;
      ctx.beginPath();
      ctx.moveTo(sc[t[2]], sc[t[2] + 1]);
      ctx.lineTo(sc[t[3]], sc[t[3] + 1]);
      ctx.lineTo(sc[t[4]], sc[t[4] + 1]);
      ctx.closePath();
      ctx.fill();
      ctx.stroke();
    }
    ctx.font = "13px sans-serif";
    ctx.textAlign = "center";
    parts.forEach(function (p) {
      if (!p.shown) return;
      var r = rotate(p.label[0] + state.explode * p.offset[0] - centre[0],
                     p.label[1] + state.explode * p.offset[1] - centre[1],
                     p.label[2] + state.explode * p.offset[2] - centre[2]);
      var x = w / 2 + s * r[0], y = h / 2 - s * r[1], tw = ctx.measureText(p.name).width;
      ctx.fillStyle = "rgba(255,255,255,0.85)";
      ctx.fillRect(x - tw / 2 - 4, y - 10, tw + 8, 16);
      ctx.fillStyle = "#111111";
      ctx.fillText(p.name, x, y + 3);
    });
    window.moldPreview = { parts: parts.length, triangles: report, explode: state.explode };
    canvas.setAttribute("data-drawn", JSON.stringify(report));
  }

  var boxes = document.getElementById("parts");
  parts.forEach(function (p, i) {
    var label = document.createElement("label");
    var box = document.createElement("input");
    box.type = "checkbox";
    box.checked = true;
    box.id = "part-" + i;
    box.addEventListener("change", function () { p.shown = box.checked; draw(); });
    var swatch = document.createElement("span");
    swatch.className = "swatch";
    swatch.style.background = data.parts[i].colour;
    label.appendChild(box);
    label.appendChild(swatch);
    label.appendChild(document.createTextNode(p.name + " (" + p.role + ")"));
    boxes.appendChild(label);
  });
  var slider = document.getElementById("explode");
  slider.addEventListener("input", function () { state.explode = slider.value / 100; draw(); });

  var drag = null;
  canvas.addEventListener("pointerdown", function (e) {
    drag = [e.clientX, e.clientY];
    canvas.setPointerCapture(e.pointerId);
  });
  canvas.addEventListener("pointermove", function (e) {
    if (!drag) return;
    state.yaw += (e.clientX - drag[0]) * 0.01;
    state.pitch = Math.max(-1.5, Math.min(1.5, state.pitch + (e.clientY - drag[1]) * 0.01));
    drag = [e.clientX, e.clientY];
    draw();
  });
  canvas.addEventListener("pointerup", function () { drag = null; });
  draw();
})();
