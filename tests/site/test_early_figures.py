"""Record figures drawn while the engine computes the responses (build with workers).

Sources of expected values: the site built in one process (jobs=1, where every figure
is drawn after all results exist) as the reference for the bytes of every file; the
figure list of the full page context (SiteContext.pages) as the reference for the record
figures started early; the staging rules of sdofreport.site.tree (nothing is left beside
the output after a failed build).
"""

from __future__ import annotations

import pytest

from sdofreport import engine
from sdofreport.build import build_site
from sdofreport.errors import BuildError
from sdofreport.project import load_project
from sdofreport.site.context import SiteContext, record_figures
from sdofreport.site.drawing import figure_key


def _files(site):
    return {p.relative_to(site).as_posix(): p.read_bytes() for p in site.rglob("*")
            if p.is_file()}


def test_early_record_figures_are_the_record_pages_figures(project_factory,
                                                           valid_project_text):
    project = load_project(project_factory(valid_project_text))
    results = engine.run_project(project, jobs=1, use_cache=False)
    context = SiteContext(results)
    context.pages()
    full = {spec.path: figure_key(spec) for spec in context.figures
            if spec.path.startswith("figures/record-")}
    early = {spec.path: figure_key(spec) for spec in record_figures(project,
                                                                    results.records)}
    assert early and early == full


def test_build_with_workers_equals_build_in_one_process(project_factory,
                                                        valid_project_text, tmp_path):
    path = project_factory(valid_project_text)
    one = build_site(path, tmp_path / "one", jobs=1, use_cache=False).output
    calls = []
    real = engine.run_project

    def spy(*args, **kwargs):
        calls.append(kwargs.get("records_ready"))
        return real(*args, **kwargs)

    with pytest.MonkeyPatch.context() as patch:
        patch.setattr("sdofreport.build.run_project", spy)
        # Chunks of one figure: even this small project's figures go to forked workers.
        patch.setattr("sdofreport.site.drawing.FIGURE_CHUNK", 1)
        two = build_site(path, tmp_path / "two", jobs=2, use_cache=False).output
    assert calls and calls[0] is not None  # the early path was taken
    assert _files(one) == _files(two)


def test_failure_after_early_figures_leaves_nothing(project_factory, valid_project_text,
                                                    tmp_path, monkeypatch):
    path = project_factory(valid_project_text)
    real = engine.run._Phase.run

    def fail_on_responses(self, plan):
        if plan and plan[0][1] == "responses":
            raise BuildError("stopped for the test after the record figures started")
        return real(self, plan)

    monkeypatch.setattr(engine.run._Phase, "run", fail_on_responses)
    out = tmp_path / "out" / "site"
    with pytest.raises(BuildError, match="stopped for the test"):
        build_site(path, out, jobs=2, use_cache=False)
    assert not out.exists()
    assert list((tmp_path / "out").iterdir()) == []  # no staging folder left beside it
