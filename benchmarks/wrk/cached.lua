-- One fixed request: after the first, every answer comes from the result cache.
wrk.method = "POST"
wrk.headers["Content-Type"] = "application/json"
wrk.body = '{"integrand": "exp(-x^2)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-6}'
