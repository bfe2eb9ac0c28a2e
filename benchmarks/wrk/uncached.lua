-- A simple integrand with a different upper limit each time, so every request is computed.
wrk.method = "POST"
wrk.headers["Content-Type"] = "application/json"
local counter = 0
request = function()
  counter = counter + 1
  local upper = string.format("%d.%06d", 1, (counter * 7919 + math.random(0, 999)) % 1000000)
  return wrk.format(nil, nil, nil,
    '{"integrand": "exp(-x^2)", "lower_limit": 0, "upper_limit": "' .. upper .. '", "tolerance": 1e-6}')
end
