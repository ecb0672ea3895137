// plumb explorer: keyboard steps through the filtered list. j or → follows
// the page's rel="next" link, k or ← its rel="prev" link; nothing happens
// while typing in a form field.
document.addEventListener("keydown", function (ev) {
  if (ev.altKey || ev.ctrlKey || ev.metaKey) return;
  var t = ev.target && ev.target.tagName;
  if (t === "INPUT" || t === "SELECT" || t === "TEXTAREA") return;
  var rel = null;
  if (ev.key === "j" || ev.key === "ArrowRight") rel = "next";
  if (ev.key === "k" || ev.key === "ArrowLeft") rel = "prev";
  if (!rel) return;
  var a = document.querySelector('a[rel="' + rel + '"]');
  if (a) { ev.preventDefault(); window.location.href = a.href; }
});
