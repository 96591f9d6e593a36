// The offline page lists the pages this phone keeps (a file of its own: the page's CSP allows no inline script).
caches.open("tilldawn-pages").then(function (cache) { return cache.keys(); }).then(function (requests) {
  var nav = document.getElementById("kept");
  var seen = { "/": true, "/offline.html": true };
  requests.forEach(function (r) {
    var path = new URL(r.url).pathname;
    if (seen[path]) return;
    seen[path] = true;
    var a = document.createElement("a");
    a.href = path;
    a.textContent = /\/log$/.test(path) ? "Logbook (" + path + ")" : path;
    nav.appendChild(a);
  });
}).catch(function () {});
