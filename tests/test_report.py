import json
import math

import numpy as np

from numag.system.parse import parse_system
from numag.app.report import check_report_to_dict, dumps, loads_check_report
from numag.singular.smoothness import CheckOptions, check_points


def test_check_report_json_round_trip():
    system = parse_system(["y^2 - x^2*(x + 1)", "z - (1 + sqrt(5))/2"], ["x", "y", "z"])
    phi = (1 + 5 ** 0.5) / 2
    report = check_points(system, [[0, 0, phi], [3, 6, phi]], CheckOptions(), seed=4)
    text = dumps(check_report_to_dict(report))
    back = loads_check_report(text)
    assert back.seed == 4 and back.options == report.options
    assert back.system.to_texts() == system.to_texts()
    for a, b in zip(report.points, back.points):
        assert a.verdict == b.verdict and a.rank == b.rank
        assert np.array_equal(a.point, b.point) and np.array_equal(a.evidence.singular_values,
                                                                    b.evidence.singular_values)
        assert a.evidence.gap == b.evidence.gap
    assert dumps(check_report_to_dict(back)) == text


def test_envelope_shape():
    system = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
    data = json.loads(dumps(check_report_to_dict(check_points(system, [[1, 0]], seed=1))))
    assert data["seed"] == 1 and data["components"] == []
    paths = data["paths"]
    assert paths["tracked"] == paths["converged"] + paths["singular_endpoint"] + paths["at_infinity"] + paths["failed"]
    point = data["points"][0]
    assert point["verdict"] == "smooth" and point["rank"] == 1
    assert point["tangent_dimension"] == 1 and point["local_dimension"] == 1
    assert point["point"] == [[1.0, 0.0], [0.0, 0.0]]
    assert "certification" in data["caution"]


def test_certificate_round_trip():
    # JSON round trip of a certificate (common practice, no source)
    from numag.certify.certificates import certify_singular_point
    from numag.certify.records import CertifyOptions
    from numag.system.parse import parse_system
    from numag.app.report import certificate_from_dict, certificate_to_dict
    certificate = certify_singular_point(parse_system(["y^2 - x^3"], ["x", "y"]), [1e-9, 0.0],
                                         options=CertifyOptions(digits=20))
    data = json.loads(json.dumps(certificate_to_dict(certificate)))
    again = certificate_from_dict(data)
    assert certificate_to_dict(again) == data
    assert again.status == "certified" and again.exact_coordinates == ["0", "0"]


def test_certification_through_worker_processes_gives_the_same_certificates():
    # same certificates in-process and on 2 workers (common practice, no source)
    from numag.run.executor import LocalPool
    from numag.system.parse import parse_system
    from numag.app.report import certify_report, singular_to_dict
    from numag.singular.locus import SingularOptions, singular_locus
    # four lines in general position: 6 nodes (problem file: four_generic_lines)
    locus = singular_locus(parse_system(["(x - y + 1)*(2*x + y - 3)*(x + 3*y + 2)*(3*x - 2*y - 7)"], ["x", "y"]),
                           seed=3)
    data = singular_to_dict(locus, SingularOptions())
    alone = certify_report(data)
    with LocalPool(2) as executor:
        pooled = certify_report(data, executor=executor)
    def strip(report):
        return [[{k: v for k, v in c.items() if k != "notes"} for c in comp["certificates"]]
                for comp in report["components"]]
    assert strip(alone) == strip(pooled)
    assert sum(len(c) for c in strip(pooled)) == 6 and pooled["certification"]["counts"]["certified"] == 6
    assert pooled["certification"]["executor"]["executor"] == "process pool"


def test_points_and_lines_as_the_standard_library_writes_them():
    # Python's own float() and json module as the reference (common practice, no source): encode_point reads the
    # complex memory as pairs and json_chunks reuses one encoder (decision 0094); the numbers and text must not move
    from numag.app.report import encode_point, json_chunks
    for seed in (1, 2, 3):
        rng = np.random.default_rng(seed)
        point = (rng.standard_normal(7) + 1j * rng.standard_normal(7)) * 10.0 ** rng.integers(-300, 300, 7)
        point[0] = complex(-0.0, 0.0)
        strided = np.concatenate([point, point])[::2]  # not contiguous
        for vector in (point, strided, list(point)):
            encoded = encode_point(vector)
            assert encoded == [[float(z.real), float(z.imag)] for z in vector]
            assert [math.copysign(1, pair[0]) for pair in encoded] == [math.copysign(1, z.real) for z in vector]
        data = {"points": [encode_point(point), encode_point(strided)], "labels": ["a", "b"], "n": [1, 2.5]}
        text = "".join(json_chunks(data))
        assert json.loads(text) == json.loads(json.dumps(data))
        assert "".join(json_chunks(data["points"][0])) == "[\n" + ",\n".join(
            "  " + json.dumps(pair) for pair in data["points"][0]) + "\n]"
