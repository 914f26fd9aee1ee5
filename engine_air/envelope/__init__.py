"""The envelope: the grid over the flight envelope, the chain run per case, the checks judged on its points, the
verdict, the one worst-point ranking and the plain-words explanations."""
