import json

import numpy as np

from numag.parse import parse_system
from numag.report import check_report_to_dict, dumps, loads_check_report
from numag.smoothness import CheckOptions, check_points


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
    from numag.certify import CertifyOptions, certify_singular_point
    from numag.parse import parse_system
    from numag.report import certificate_from_dict, certificate_to_dict
    certificate = certify_singular_point(parse_system(["y^2 - x^3"], ["x", "y"]), [1e-9, 0.0],
                                         options=CertifyOptions(digits=20))
    data = json.loads(json.dumps(certificate_to_dict(certificate)))
    again = certificate_from_dict(data)
    assert certificate_to_dict(again) == data
    assert again.status == "certified" and again.exact_coordinates == ["0", "0"]
