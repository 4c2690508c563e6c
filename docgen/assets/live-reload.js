// docgen preview only: reload the page when the preview server reports a new build.
(function () {
  "use strict";
  var seen = null;
  var checks = 0;
  var limit = 3600; // stop asking after an hour of polling once a second
  function poll() {
    checks += 1;
    if (checks > limit) { return; }
    fetch("/__docgen_build", { cache: "no-store" })
      .then(function (response) { return response.text(); })
      .then(function (text) {
        if (seen !== null && text !== seen) { window.location.reload(); return; }
        seen = text;
        window.setTimeout(poll, 1000);
      })
      .catch(function () { window.setTimeout(poll, 3000); });
  }
  poll();
}());
